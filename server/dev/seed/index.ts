/** Builds the demo scenario in one transaction; idempotent, so `npm start` may run it every time. Never in production. */
import type { Db } from '../../db/knex.js';
import { seedPeopleAndTrials } from './people-and-trials.js';
import { seedDesigns } from './designs.js';
import { seedPatients } from './patients.js';
import { seedDataCuts } from './data-cuts.js';
import { seedSafety } from './safety.js';

export async function seedDemo(db: Db, today = new Date()): Promise<void> {
  // The demo's invented people and trials (every password "demo") must never reach a real installation.
  if (process.env.NODE_ENV === 'production') throw new Error('The demo scenario is never seeded in production (NODE_ENV=production).');
  await db.transaction(async (trx) => {
    const trials = await seedPeopleAndTrials(trx, today);
    await seedDesigns(trx, trials, today);
    await seedPatients(trx, trials, today);
    await seedSafety(trx, trials, today);
    await seedDataCuts(trx, trials, today);
  });
}
