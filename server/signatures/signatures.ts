/**
 * Electronic signatures: who signed, when, what the signature means, over which content (a hash),
 * and the fresh sign-in at the identity provider behind it (`prompt=login`).
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Request } from 'express';
import type { Config } from '../config.js';
import { ReauthenticationRequiredError, UnauthenticatedError } from '../http/errors.js';

export type SignatureSubject = 'design' | 'amendment' | 'attestation' | 'recommendation';

export type Signature = {
  id: string;
  signerUserId: string;
  signerEmail: string;
  meaning: string;
  subjectType: SignatureSubject;
  subjectId: string;
  contentHash: string;
  authenticatedAt: string;
  signedAt: string;
};

type SignatureRow = {
  id: string;
  signer_user_id: string;
  signer_email: string;
  meaning: string;
  subject_type: SignatureSubject;
  subject_id: string;
  content_hash: string;
  authenticated_at: Date;
  signed_at: Date;
};

export const REAUTH_URL = '/auth/login?reauth=1';

/** Stable hash of a JSON-able value: keys sorted, so equal content always hashes equal. */
export function contentHash(value: unknown): string {
  const canonical = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(canonical);
    if (v && typeof v === 'object' && !(v instanceof Date)) {
      return Object.fromEntries(
        Object.keys(v as Record<string, unknown>)
          .sort()
          .map((key) => [key, canonical((v as Record<string, unknown>)[key])]),
      );
    }
    return v;
  };
  return createHash('sha256').update(JSON.stringify(canonical(value))).digest('hex');
}

/** The time of the user's last sign-in at the identity provider, if it is fresh enough to sign. */
export function requireFreshAuthentication(req: Request, config: Config): Date {
  if (!req.user) throw new UnauthenticatedError();
  const authTime = req.session.authTime;
  const ageSeconds = authTime ? Date.now() / 1000 - authTime : Infinity;
  if (!authTime || ageSeconds > config.signatureFreshnessSeconds) throw new ReauthenticationRequiredError(REAUTH_URL);
  return new Date(authTime * 1000);
}

export function toSignature(row: SignatureRow): Signature {
  return {
    id: row.id,
    signerUserId: row.signer_user_id,
    signerEmail: row.signer_email,
    meaning: row.meaning,
    subjectType: row.subject_type,
    subjectId: row.subject_id,
    contentHash: row.content_hash,
    authenticatedAt: row.authenticated_at.toISOString(),
    signedAt: row.signed_at.toISOString(),
  };
}

export async function recordSignature(
  trx: Knex.Transaction,
  input: {
    trialId: string;
    signer: { id: string; email: string };
    meaning: string;
    subjectType: SignatureSubject;
    subjectId: string;
    content: unknown;
    authenticatedAt: Date;
  },
): Promise<Signature> {
  const [row] = await trx('signatures')
    .insert({
      trial_id: input.trialId,
      signer_user_id: input.signer.id,
      signer_email: input.signer.email,
      meaning: input.meaning,
      subject_type: input.subjectType,
      subject_id: input.subjectId,
      content_hash: contentHash(input.content),
      authenticated_at: input.authenticatedAt,
    })
    .returning('*');
  return toSignature(row as SignatureRow);
}
