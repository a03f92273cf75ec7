/**
 * Electronic signatures: who signed, when, what the signature means, over which content (a hash),
 * and the fresh sign-in at the identity provider behind it (`prompt=login`).
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { ReauthenticationRequiredError } from '../http/errors.js';

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

/**
 * The sign-in behind a signature, as the HTTP layer read it from the session: the time of the
 * user's last sign-in at the identity provider (seconds since the epoch) and how old it may be.
 */
export type SignIn = { authTime: number | undefined; maxAgeSeconds: number };

/** The time of that sign-in, if it is fresh enough to sign; otherwise 401 with the way to sign in again. */
export function requireFreshAuthentication(signIn: SignIn, now = Date.now()): Date {
  const { authTime } = signIn;
  const ageSeconds = authTime ? now / 1000 - authTime : Infinity;
  if (!authTime || ageSeconds > signIn.maxAgeSeconds) throw new ReauthenticationRequiredError(REAUTH_URL);
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
