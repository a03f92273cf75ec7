/** Builds the demo scenario in one transaction; idempotent, so `npm start` may run it every time. */
import type { Db } from '../../db/knex.js';
import { seedPeopleAndTrials } from './people-and-trials.js';
import { seedDesigns } from './designs.js';
import { seedPatients } from './patients.js';
import { seedDataCuts } from './data-cuts.js';
import { seedSafety } from './safety.js';

export async function seedDemo(db: Db, today = new Date()): Promise<void> {
  await db.transaction(async (trx) => {
    const trials = await seedPeopleAndTrials(trx, today);
    await seedDesigns(trx, trials, today);
    await seedPatients(trx, trials, today);
    await seedSafety(trx, trials, today);
    await seedDataCuts(trx, trials, today);
  });
}
