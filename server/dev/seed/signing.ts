/**
 * The demo's signatures rest on signing authentications like any other: one is recorded for each,
 * as if the person had entered their password for that signature at the time, and the signature
 * consumes it.
 */
import type { Knex } from 'knex';
import { recordSigningAuthentication, type SigningIntent, type SigningSession } from '../../signatures/signatures.js';

const DEMO_SESSION = 'demo-seed';

export async function demoSigningSession(trx: Knex.Transaction, userId: string, intent: SigningIntent, authenticatedAt: Date): Promise<SigningSession> {
  const user: { name: string | null; email: string } = await trx('users').where({ id: userId }).first('name', 'email');
  const session = { userId, sessionId: DEMO_SESSION };
  await recordSigningAuthentication(trx, { ...session, intent, signerName: user.name ?? user.email, authenticatedAt, validForSeconds: 60 });
  return session;
}
