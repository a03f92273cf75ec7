/**
 * The demo seed's safety: TSY-201 monitors toxicity with a continuous boundary, has invented
 * adverse events of every kind, and stands near its boundary but not over it (no pause); running
 * the seed again changes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase } from '../support/stack.js';
import { createDb, type Db } from '../../server/db/knex.js';
import { seedDemo } from '../../server/dev/seed/index.js';
import { safetyOfTrial } from '../../server/safety/safety.service.js';

let db: Db;
const today = new Date('2026-12-01T12:00:00Z');
const todayIso = '2026-12-01';

beforeAll(async () => {
  db = createDb((await createTestDatabase()).runtimeUrl, { poolMax: 2 });
  await seedDemo(db, today);
}, 120_000);
afterAll(async () => db?.destroy());

const trialId = async (code: string) => (await db('trials').where({ code }).first('id')).id as string;

describe('demo safety', () => {
  it('when the seed runs again, then no event is added', async () => {
    const count = async () => Number((await db('adverse_events').count({ c: '*' }))[0].c);
    const before = await count();
    await seedDemo(db, today);
    expect(await count()).toBe(before);
    expect(before).toBeGreaterThan(5);
  });

  it('when TSY-201 is read, then its boundary is locked with the design and the cohort is one toxicity short of it, not paused', async () => {
    const { cohorts } = await safetyOfTrial(db, await trialId('TSY-201'), todayIso);
    const [cohort] = cohorts;
    expect(cohort.lockedRule).toMatchObject({ safetyRule: 'toxicity_boundary', definition: { minGrade: 3, windowDays: 28 }, boundary: { theta: 0.25, alpha: 0.1, n: 43 } });
    expect(cohort.safetyPause).toBeNull();
    expect(cohort.state).toMatchObject({ rule: 'toxicity_boundary', crossed: false });
    if (cohort.state?.rule !== 'toxicity_boundary') throw new Error('expected the boundary');
    expect(cohort.state.toxicities).toBe((cohort.state.bound as number) - 1);
    expect(cohort.state.toNextStop).toBeLessThanOrEqual(2);
    expect(cohort.counts?.awaitingAssessment).toBe(1);
  });

  it('when the events are read, then they include toxicities, events that do not count, one awaiting its grade and attested ones at HCC', async () => {
    const events = await db('adverse_events as e').join('patients as p', 'p.id', 'e.patient_id').where('p.trial_id', await trialId('TSY-201')).select('e.grade', 'e.attribution', 'e.attestation_signature_id');
    expect(events.some((e) => e.grade >= 3 && ['possible', 'probable', 'definite'].includes(e.attribution))).toBe(true);
    expect(events.some((e) => e.attribution === 'unrelated')).toBe(true);
    expect(events.some((e) => e.grade === null)).toBe(true);
    expect(events.some((e) => e.attestation_signature_id)).toBe(true);
    const others = await db('adverse_events as e').join('patients as p', 'p.id', 'e.patient_id').whereNot('p.trial_id', await trialId('TSY-201')).count({ n: '*' });
    expect(Number(others[0].n)).toBe(0);
  });
});
