/** Builders for Designs tests: request bodies, an aged sign-in, and counts of what a request wrote. */
import type { Db } from '../../server/db/knex.js';
import type { Session } from './sign-in.js';

/** The demo trial TSY-201's settings (the demo seed's, server/dev/seed/designs.ts). */
export const TSY201_SETTINGS = { p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2, nmax: 60 };

export function lockBody(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    ...TSY201_SETTINGS,
    selection: 'optimal',
    analysisPopulation: 'all_enrolled',
    interimAccrual: 'pause',
    sponsorSeesResponse: false,
    protocolReference: 'PRT-TEST v1.0',
    confirmMeaning: true,
    ...overrides,
  };
}

/** The session id inside the signed `orrery.sid` cookie (`s:<sid>.<signature>`). */
export function sessionId(session: Session): string {
  const raw = decodeURIComponent(session.jar.get('orrery.sid') ?? '');
  return raw.slice(2, raw.lastIndexOf('.'));
}

/** Makes the session's last sign-in at the identity provider `seconds` older, as if time had passed. */
export async function ageSignIn(db: Db, session: Session, seconds: number): Promise<void> {
  const updated = await db('session')
    .where({ sid: sessionId(session) })
    .update({ sess: db.raw(`jsonb_set(sess::jsonb, '{authTime}', to_jsonb((sess->>'authTime')::bigint - ?))::json`, [seconds]) });
  if (updated !== 1) throw new Error('session row not found');
}

export async function signInTime(db: Db, session: Session): Promise<number> {
  const row = await db('session').where({ sid: sessionId(session) }).first('sess');
  return Number(row.sess.authTime);
}

/** Rows in the tables a design write touches, to show that a refused request wrote nothing. */
export async function writeCounts(db: Db): Promise<{ designs: number; signatures: number; audit: number }> {
  const count = async (table: string) => Number((await db(table).count({ count: '*' }))[0].count);
  return { designs: await count('design_versions'), signatures: await count('signatures'), audit: await count('audit_log') };
}
