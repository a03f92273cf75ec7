/**
 * A signature written straight to the database for arranging a test's starting state, resting on
 * a signing authentication consumed for it as the database requires (the signing routes
 * themselves are tested over HTTP, password entry included).
 */
import type { Db } from '../../server/db/knex.js';
import type { SignatureSubject, SigningAction } from '../../server/signatures/signatures.js';

export async function signDirectly(
  db: Db,
  input: {
    trialId: string;
    signerId: string;
    signerEmail: string;
    intent: { action: SigningAction; subjectId: string };
    subjectType: SignatureSubject;
    subjectId: string;
    meaning: string;
    contentHash: string;
    at?: Date;
  },
): Promise<string> {
  const at = input.at ?? new Date();
  const [authentication] = await db('signing_authentications')
    .insert({
      user_id: input.signerId,
      session_id: 'test-fixture',
      intent_type: input.intent.action,
      intent_subject_id: input.intent.subjectId,
      signer_name: input.signerEmail,
      authenticated_at: at,
      expires_at: at,
      consumed_at: at,
    })
    .returning('id');
  const [signature] = await db('signatures')
    .insert({
      trial_id: input.trialId,
      signer_user_id: input.signerId,
      signer_email: input.signerEmail,
      signer_name: input.signerEmail,
      meaning: input.meaning,
      subject_type: input.subjectType,
      subject_id: input.subjectId,
      content_hash: input.contentHash,
      authenticated_at: at,
      signed_at: at,
      signing_authentication_id: authentication.id,
    })
    .returning('id');
  return signature.id as string;
}
