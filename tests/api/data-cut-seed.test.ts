import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { seedPeopleAndTrials } from '../../server/dev/seed/people-and-trials.js';
import { seedDataCuts } from '../../server/dev/seed/data-cuts.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import { outcomes } from '../support/data-cut-factories.js';

let stack: Stack;

beforeAll(async () => {
  stack = await startStack();
});
afterAll(async () => stack?.close());

const today = new Date('2026-09-15T09:00:00Z');

/** The demo trials with stage-1 patients, arranged the way the design and patient seeds leave them. */
async function arrangeDemo(): Promise<Map<string, string>> {
  const trials = await stack.db.transaction((trx) => seedPeopleAndTrials(trx, today));
  const rvg = (await stack.db('sites').where({ code: 'RVG' }).first()).id;
  const plans: Array<[string, string, ReturnType<typeof outcomes>, Record<string, unknown>]> = [
    ['TSY-201', 'enrolling_stage_2', [...outcomes(5, 8), ...outcomes(1, 3)], {}],
    ['TSY-202', 'interim_review', outcomes(2, 13), { p0: 0.1, p1: 0.3, r1: 1, n1: 15, r: 5, n: 25 }],
    ['TSY-203', 'interim_review', outcomes(2, 11), {}],
  ];
  for (const [code, status, patients, design] of plans) {
    const trialId = trials.get(code) as string;
    const cohort = await stack.db('cohorts').where({ trial_id: trialId }).first();
    await lockDesignDirectly(stack.db, { trialId, cohortId: cohort.id, cohortStatus: status, ...design });
    await enrolPatientsDirectly(stack.db, { trialId, cohortId: cohort.id, siteId: rvg, patients, firstEnrolledOn: '2026-01-05' });
  }
  return trials;
}

describe('the demo data cuts', () => {
  it('when the seed runs twice after the patients, then TSY-201 continues, TSY-203 is stopped for futility and TSY-202 awaits its review — once each', async () => {
    const trials = await arrangeDemo();
    await stack.db.transaction((trx) => seedDataCuts(trx, trials, today));
    await stack.db.transaction((trx) => seedDataCuts(trx, trials, today));
    const cuts = await stack.db('data_cuts as d').join('trials as t', 't.id', 'd.trial_id').select('t.code', 'd.id', 'd.patient_count', 'd.snapshot').orderBy('t.code');
    expect(cuts.map((c) => c.code)).toEqual(['TSY-201', 'TSY-202', 'TSY-203']);
    // TSY-201's interim cut saw stage 1 only (13 patients), not the stage-2 patients enrolled later.
    expect(cuts[0].patient_count).toBe(13);
    const decisions = await stack.db('data_cut_decisions').select('action', 'to_status').orderBy('action');
    expect(decisions).toEqual([
      { action: 'resume_stage_2', to_status: 'enrolling_stage_2' },
      { action: 'stop', to_status: 'stopped' },
    ]);
    const recommendations = await stack.db('recommendations').select('decision').orderBy('decision');
    expect(recommendations.map((r) => r.decision)).toEqual(['continue', 'stop_futility']);
    const tsy203 = await stack.db('cohorts').where({ trial_id: trials.get('TSY-203') }).first();
    expect(tsy203).toMatchObject({ status: 'stopped', stop_category: 'futility' });
    const tsy202 = await stack.db('cohorts').where({ trial_id: trials.get('TSY-202') }).first();
    expect(tsy202.status).toBe('interim_review');
  });
});
