/** Builds the demo scenario in one transaction; idempotent, so `npm start` may run it every time. */
import type { Db } from '../../db/knex.js';
import { seedPeopleAndTrials } from './people-and-trials.js';

export async function seedDemo(db: Db, today = new Date()): Promise<void> {
  await db.transaction(async (trx) => {
    await seedPeopleAndTrials(trx, today);
  });
}
