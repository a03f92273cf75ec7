/**
 * The trials a user belongs to, as the Portfolio, the trial list and the digest read them. The
 * roles and each trial's data version are read fresh on every call, in one narrow statement, so a
 * removed membership holds at once; the trial records and their cohorts are kept per data version
 * (server/db/trial-versions.ts: a committed change to a trial or its cohorts moves it on).
 */
import type { Db, FirstRead } from '../db/knex.js';
import { inOneSnapshot, trialDataVersions, VersionedCache } from '../db/trial-versions.js';
import { rolesAndVersions, trialsWithCohorts, type Trial, type TrialForUser } from './trials.repository.js';

const records = new VersionedCache<Trial>(2000);

/** `read` runs the first statement, the roles and versions (a route passes one that confirms its session in it). */
export async function listTrialsForUser(db: Db, userId: string, read?: FirstRead): Promise<TrialForUser[]> {
  const mine = await rolesAndVersions(db, userId, read);
  const found = new Map<string, { trial: Trial; dataVersion: number }>();
  const missing: string[] = [];
  for (const [trialId, { dataVersion }] of mine) {
    const hit = records.get(trialId, dataVersion);
    if (hit) found.set(trialId, { trial: hit, dataVersion });
    else missing.push(trialId);
  }
  if (missing.length > 0) {
    // The record and the version it stands at, read in one snapshot (the version may have moved on since the roles were read).
    await inOneSnapshot(db, async (trx) => {
      const versions = await trialDataVersions(trx, missing);
      for (const trial of await trialsWithCohorts(trx, missing)) {
        const dataVersion = versions.get(trial.id) as number;
        records.set(trial.id, dataVersion, trial);
        found.set(trial.id, { trial, dataVersion });
      }
    });
  }
  return [...found.values()]
    .sort((a, b) => a.trial.code.localeCompare(b.trial.code, 'en'))
    .map(({ trial, dataVersion }) => ({ ...trial, myRoles: mine.get(trial.id)?.roles ?? [], dataVersion }));
}
