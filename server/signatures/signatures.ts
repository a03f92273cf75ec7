/**
 * Electronic signatures (21 CFR Part 11 §11.50, §11.100, §11.200). A signature records who signed
 * (their printed name as it was at signing, their e-mail), when, what the signature means, and the
 * hash of the signed content. Each rests on one signing authentication: a password entered at the
 * identity provider (`prompt=login`, `max_age=0`) for one signing intent — the action and the
 * record about to be signed — in one browser session, usable for a few minutes and consumed by the
 * signature in the signature's own transaction. An ordinary sign-in never counts, an
 * authentication for another intent does not either, and the next signature needs a new one.
 * The database keeps signatures append-only and refuses a second signature on one authentication.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { ReauthenticationRequiredError } from '../http/errors.js';

type Conn = Db | Knex.Transaction;

export type SignatureSubject = 'design' | 'amendment' | 'attestation' | 'recommendation';

/** What a password is entered for: locking a cohort's design, amending it, attesting a patient's outcome, recommending on a data cut. */
export const SIGNING_ACTIONS = ['design', 'amendment', 'attestation', 'recommendation'] as const;
export type SigningAction = (typeof SIGNING_ACTIONS)[number];

/** The signing intent: the action and the record it concerns (cohort, patient or data cut). */
export type SigningIntent = { action: SigningAction; subjectId: string };

/** The browser session asking to sign: its user and its session id. */
export type SigningSession = { userId: string; sessionId: string };

export type Signature = {
  id: string;
  signerUserId: string;
  signerEmail: string;
  /** The signer's name as it was at signing (null only on signatures made before names were kept). */
  signerName: string | null;
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
  signer_name: string | null;
  meaning: string;
  subject_type: SignatureSubject;
  subject_id: string;
  content_hash: string;
  authenticated_at: Date | string;
  signed_at: Date | string;
};

/** Where the browser goes to enter the password for this intent (the client adds `returnTo`). */
export function signingUrl(intent: SigningIntent): string {
  return `/auth/login?intent=${intent.action}&subject=${encodeURIComponent(intent.subjectId)}`;
}

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

export function toSignature(row: SignatureRow): Signature {
  return {
    id: row.id,
    signerUserId: row.signer_user_id,
    signerEmail: row.signer_email,
    signerName: row.signer_name,
    meaning: row.meaning,
    subjectType: row.subject_type,
    subjectId: row.subject_id,
    contentHash: row.content_hash,
    authenticatedAt: new Date(row.authenticated_at).toISOString(),
    signedAt: new Date(row.signed_at).toISOString(),
  };
}

/** Stores a password entry made for one intent (the sign-in callback's work); it expires after `validForSeconds`. */
export async function recordSigningAuthentication(
  conn: Conn,
  input: SigningSession & { intent: SigningIntent; signerName: string; authenticatedAt: Date; validForSeconds: number },
): Promise<string> {
  const [row] = await conn('signing_authentications')
    .insert({
      user_id: input.userId,
      session_id: input.sessionId,
      intent_type: input.intent.action,
      intent_subject_id: input.intent.subjectId,
      signer_name: input.signerName,
      authenticated_at: input.authenticatedAt,
      expires_at: conn.raw(`now() + make_interval(secs => ?)`, [input.validForSeconds]),
    })
    .returning('id');
  return row.id as string;
}

/** The intents this session has a usable password entry for (the sign dialogs ask, to offer the final step). */
export async function readyIntents(db: Db, session: SigningSession): Promise<ReadyIntent[]> {
  const [row] = await db.select({ ready: readyIntentsJson(db, session) });
  return toReadyIntents(row.ready);
}

export type ReadyIntent = SigningIntent & { expiresAt: string };

/** The session's unused, unexpired password entries as one JSON array, for a read that gathers several things in one statement. */
export function readyIntentsJson(db: Db, session: SigningSession): Knex.Raw {
  const rows = db('signing_authentications')
    .where({ user_id: session.userId, session_id: session.sessionId })
    .whereNull('consumed_at')
    .where('expires_at', '>', db.fn.now())
    .select('intent_type', 'intent_subject_id', 'expires_at');
  return db.raw(`(select coalesce(json_agg(q order by q.expires_at), '[]'::json) from (?) q)`, [rows]);
}

export function toReadyIntents(json: unknown): ReadyIntent[] {
  const rows = json as Array<{ intent_type: SigningAction; intent_subject_id: string; expires_at: string }>;
  return rows.map((r) => ({ action: r.intent_type, subjectId: r.intent_subject_id, expiresAt: new Date(r.expires_at).toISOString() }));
}

/**
 * Consumes this session's password entry for this intent, or answers 401 with the way to make one.
 * The row is locked and marked in the caller's transaction: of two signatures racing for one
 * entry, the second finds it consumed.
 */
async function consumeAuthentication(trx: Knex.Transaction, session: SigningSession, intent: SigningIntent) {
  const { rows } = await trx.raw(
    `update signing_authentications set consumed_at = now()
      where id = (select id from signing_authentications
                   where user_id = ? and session_id = ? and intent_type = ? and intent_subject_id = ?
                     and consumed_at is null and expires_at > now()
                   order by authenticated_at desc limit 1
                   for update)
        and consumed_at is null
      returning id, signer_name, authenticated_at`,
    [session.userId, session.sessionId, intent.action, intent.subjectId],
  );
  const row = rows[0] as { id: string; signer_name: string; authenticated_at: Date } | undefined;
  if (!row) throw new ReauthenticationRequiredError(signingUrl(intent));
  return row;
}

/**
 * Records a signature inside the caller's transaction, consuming the session's password entry for
 * `intent`; without one, 401 and nothing is written.
 */
export async function recordSignature(
  trx: Knex.Transaction,
  input: {
    trialId: string;
    signer: { id: string; email: string };
    session: SigningSession;
    intent: SigningIntent;
    meaning: string;
    subjectType: SignatureSubject;
    subjectId: string;
    content: unknown;
  },
): Promise<Signature> {
  if (input.session.userId !== input.signer.id) throw new ReauthenticationRequiredError(signingUrl(input.intent));
  const authentication = await consumeAuthentication(trx, input.session, input.intent);
  const [row] = await trx('signatures')
    .insert({
      trial_id: input.trialId,
      signer_user_id: input.signer.id,
      signer_email: input.signer.email,
      signer_name: authentication.signer_name,
      meaning: input.meaning,
      subject_type: input.subjectType,
      subject_id: input.subjectId,
      content_hash: contentHash(input.content),
      authenticated_at: authentication.authenticated_at,
      signing_authentication_id: authentication.id,
    })
    .returning('*');
  return toSignature(row as SignatureRow);
}
