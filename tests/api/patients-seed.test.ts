/**
 * The demo patients make the demo scenario true on top of the demo designs, and running
 * the seed again changes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase } from '../support/stack.js';
import { createDb, type Db } from '../../server/db/knex.js';
import { seedDemo } from '../../server/dev/seed/index.js';
import { evaluateTrial } from '../../server/evaluation/evaluation.service.js';

let db: Db;
const today = new Date('2026-12-01T12:00:00Z');

beforeAll(async () => {
  db = createDb((await createTestDatabase()).runtimeUrl, { poolMax: 2 });
  await seedDemo(db, today);
}, 120_000);
afterAll(async () => db?.destroy());

const trialId = async (code: string) => (await db('trials').where({ code }).first('id')).id as string;
const evaluation = async (code: string) => (await evaluateTrial(db, await trialId(code))).cohorts;

describe('demo patients', () => {
  it('when the seed runs again, then nothing changes', async () => {
    const count = async () => Number((await db('patients').count({ c: '*' }))[0].c);
    const before = await count();
    await seedDemo(db, today);
    expect(await count()).toBe(before);
    expect(before).toBeGreaterThan(40);
  });

  it('when TSY-201 is read, then it is in stage 2 with patients at all four sites and stage 1 passed', async () => {
    const [c] = await evaluation('TSY-201');
    const sites = await db('patients as p').join('sites as s', 's.id', 'p.site_id').where('p.trial_id', await trialId('TSY-201')).distinct('s.code').pluck('s.code');
    expect(sites.sort()).toEqual(['HCC', 'LUH', 'NGC', 'RVG']);
    expect(c.status).toBe('enrolling_stage_2');
    expect(c.stage1?.responders).toBeGreaterThan(c.design?.r1 as number);
    expect(c.stage2?.counted).toBeGreaterThan(0);
    expect(c.pending).toBeGreaterThan(0);
  });

  it('when TSY-202 is read, then its stage-1 cohort is complete and accrual is paused', async () => {
    const [c] = await evaluation('TSY-202');
    expect(c.status).toBe('interim_review');
    expect(c.stage1?.counted).toBe(c.design?.n1);
  });

  it('when TSY-203 is read, then it stopped for futility with at most r1 responders among n1', async () => {
    const [c] = await evaluation('TSY-203');
    expect(c.status).toBe('stopped');
    expect(c.counted).toBe(c.design?.n1);
    expect(c.rule?.decision).toBe('stop-futility');
  });

  it('when TSY-204 is read, then its three cohorts are enrolling, none beyond n1', async () => {
    const cohorts = await evaluation('TSY-204');
    expect(cohorts.map((c) => c.status)).toEqual(['enrolling_stage_1', 'enrolling_stage_1', 'enrolling_stage_1']);
    for (const c of cohorts) expect(c.counted).toBeLessThan(c.design?.n1 as number);
  });

  it('when dates are read, then none is in the future, none before its trial started, and responses follow enrolment', async () => {
    const rows = await db('patients as p').join('trials as t', 't.id', 'p.trial_id').select('p.enrolled_on', 'p.response_assessed_on', 't.start_date');
    for (const r of rows) {
      expect(r.enrolled_on <= '2026-12-01').toBe(true);
      expect(r.enrolled_on >= r.start_date).toBe(true);
      if (r.response_assessed_on) expect(r.response_assessed_on >= r.enrolled_on && r.response_assessed_on <= '2026-12-01').toBe(true);
    }
    const studyIds = await db('patients as p').join('sites as s', 's.id', 'p.site_id').select('p.study_id', 's.code');
    for (const r of studyIds) expect(r.study_id.startsWith(`${r.code}-`)).toBe(true);
  });
});
