/** Builders for Designs tests: request bodies and counts of what a request wrote. */
import type { Db } from '../../server/db/knex.js';

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

/** Rows in the tables a design write touches, to show that a refused request wrote nothing. */
export async function writeCounts(db: Db): Promise<{ designs: number; signatures: number; audit: number }> {
  const count = async (table: string) => Number((await db(table).count({ count: '*' }))[0].count);
  return { designs: await count('design_versions'), signatures: await count('signatures'), audit: await count('audit_log') };
}
