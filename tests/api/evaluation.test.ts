/**
 * The live evaluation on the Trial overview: its numbers are the statistics engine's on the same
 * counts, its verdict is the engine's at the look the cohort's status gives, and it says when stage 1
 * is settled early.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectDesign, type DirectPatient } from '../support/patient-factories.js';
import { binomialTest, cohortVerdict, proportionInterval } from '../../server/stats/index.js';
import type { Session } from '../support/sign-in.js';
import { tally } from '../../server/evaluation/counting.js';
import { PATH_POINTS, ruleState } from '../../server/evaluation/evaluation.service.js';
import { countablePatients } from '../../server/patients/patients.repository.js';

let stack: Stack;
const s = {} as Record<'statistician' | 'sponsor' | 'coordinator' | 'admin', Session>;

const R: DirectPatient = { outcome: 'responder', bestOverallResponse: 'PR' };
const N: DirectPatient = { outcome: 'non_responder', bestOverallResponse: 'SD' };
const P: DirectPatient = { outcome: 'pending' };
const NE: DirectPatient = { outcome: 'pending', evaluable: false, notEvaluableReason: 'No baseline scan' };

beforeAll(async () => {
  stack = await startStack();
  for (const role of ['statistician', 'sponsor', 'coordinator', 'admin'] as const) s[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

async function arrange(design: Omit<DirectDesign, 'trialId' | 'cohortId'>, patients: DirectPatient[]) {
  const trial = await createTrial(stack.db);
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], ...design });
  await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, patients });
  return trial;
}

describe('the live evaluation', () => {
  it('when a stage-2 cohort is evaluated, then rate, exact interval, one-sided test and verdict equal the engine on the same counts', async () => {
    // Simon's optimal design for p0 0.20, p1 0.40 (3/13, 12/43): 13 stage-1 patients with 5 responders, then 6 more with 2.
    const stage1 = [R, N, N, R, N, N, R, N, N, R, N, R, N];
    const stage2 = [R, N, N, R, N, N, P];
    const trial = await arrange({ p0: 0.2, p1: 0.4, r1: 3, n1: 13, r: 12, n: 43, cohortStatus: 'enrolling_stage_2' }, [...stage1, ...stage2]);
    const res = await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`);
    expect(res.status).toBe(200);
    const c = res.body.cohorts[0];
    expect(c).toMatchObject({ enrolled: 20, counted: 20, decided: 19, pending: 1, responders: 7, notEvaluable: 0 });
    expect(c.stage1).toEqual({ counted: 13, decided: 13, responders: 5, pending: 0 });
    const [lo, hi] = proportionInterval(7, 19, { method: 'clopper-pearson', confLevel: 0.95 });
    expect(c.rate.estimate).toBe(7 / 19);
    expect(c.rate.ci).toEqual([lo, hi]);
    expect(c.test.pValue).toBe(binomialTest(7, 19, 0.2, { alternative: 'greater' }).pValue);
    const verdict = cohortVerdict({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 }, { stage1: c.stage1, stage2: c.stage2 }, 'stage-2');
    expect(c.rule).toMatchObject(verdict);
    expect(c.rule).toMatchObject({ applied: 'final', decision: 'undetermined', pendingThatCanChange: 1, placesLeft: 23, atRisk: 0 });
    expect(c.rule.message).toMatch(/^The final analysis is not yet decided: 7 responders among 19 decided/);
    expect(res.body.cautions).toHaveLength(4);
    expect(res.body.cautions.join(' ')).toMatch(/Decision support only/);
    expect(c.path).toHaveLength(19);
    expect(c.path.at(-1)).toEqual({ evaluable: 19, responders: 7 });
  });

  it('when r1 + 1 responders are reached before n1 (common practice: stage 1 is then settled), then the evaluation says so and what happens to accrual', async () => {
    const trial = await arrange({ p0: 0.2, p1: 0.4, r1: 3, n1: 13, r: 12, n: 43 }, [R, R, N, R, R, P, P]);
    const res = await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`);
    const c = res.body.cohorts[0];
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'continue', determinedEarly: true, pendingThatCanChange: 0, placesLeft: 0, toSettle: null });
    expect(c.earlyDetermination).toMatch(/^Stage 1 is settled early: r1 \+ 1 = 4 responders were reached before n1 = 13/);
    expect(c.accrual).toMatch(/still pauses at n1 = 13/);
    const atRisk = await arrange({ p0: 0.2, p1: 0.4, r1: 3, n1: 13, r: 12, n: 43, interimAccrual: 'continue_at_risk' }, [R, R, R, R]);
    const other = (await s.statistician.get(`/api/trials/${atRisk.trialId}/evaluation`)).body.cohorts[0];
    expect(other.accrual).toMatch(/continue at risk/);
  });

  it('when stage 1 ends with r1 or fewer responders, then the futility rule is reported as met', async () => {
    const trial = await arrange({ p0: 0.1, p1: 0.3, r1: 1, n1: 10, r: 5, n: 29 }, [N, N, R, N, N, N, N, N, N, N]);
    const c = (await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0];
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'stop-futility', determinedEarly: false });
    expect(c.rule.message).toMatch(/futility rule is met/);
  });

  it('when all enrolled count, then a non-evaluable patient is a non-responder in the figures', async () => {
    const trial = await arrange({ p0: 0.2, p1: 0.4, r1: 3, n1: 13, r: 12, n: 43 }, [R, NE, N]);
    const c = (await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0];
    expect(c).toMatchObject({ decided: 3, responders: 1, notEvaluable: 1 });
    expect(c.test.pValue).toBe(binomialTest(1, 3, 0.2, { alternative: 'greater' }).pValue);
  });

  it('when the design is single-stage, then the final rule applies from the start', async () => {
    const trial = await arrange({ p0: 0.2, p1: 0.4, r1: null, n1: null, r: 10, n: 35 }, [R, N]);
    const c = (await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0];
    expect(c.rule).toMatchObject(cohortVerdict({ r1: null, n1: null, r: 10, n: 35, p0: 0.2, alpha: 0.05 }, { stage1: c.stage1, stage2: c.stage2 }, 'stage-1'));
    expect(c.rule).toMatchObject({ applied: 'final', decision: 'undetermined', threshold: { r: 10, n: 35, source: 'planned' }, placesLeft: 33 });
  });

  it('when the design lets sponsors see response, then the sponsor gets the live figures; otherwise neither the sponsor nor the trial manager gets a response key, and each is told why', async () => {
    const hidden = await arrange({}, [R, N]);
    for (const who of [s.sponsor, s.admin]) {
      const c = (await who.get(`/api/trials/${hidden.trialId}/evaluation`)).body.cohorts[0];
      expect(c).toMatchObject({ enrolled: 2, counted: 2, decided: 2, pending: 0 });
      for (const key of ['responders', 'stage1', 'stage2', 'rate', 'test', 'rule', 'earlyDetermination', 'accrual', 'notes', 'path', 'released', 'ownSites']) expect(c).not.toHaveProperty(key);
      expect(c.efficacyHidden).toEqual(expect.any(String));
    }
    expect((await s.admin.get(`/api/trials/${hidden.trialId}/evaluation`)).body.cohorts[0].efficacyHidden).toMatch(/operational figures only/);
    const shown = await arrange({ sponsorSeesResponse: true }, [R, N]);
    const sponsorView = (await s.sponsor.get(`/api/trials/${shown.trialId}/evaluation`)).body.cohorts[0];
    expect(sponsorView).toMatchObject({ responders: 1, decided: 2, rate: { estimate: 0.5 } });
    expect(sponsorView).not.toHaveProperty('efficacyHidden');
    expect((await s.admin.get(`/api/trials/${shown.trialId}/evaluation`)).body.cohorts[0]).not.toHaveProperty('responders');
  });

  it('when a cohort has no locked design, then counts are given and the rule state is absent', async () => {
    const trial = await createTrial(stack.db);
    const c = (await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0];
    expect(c).toMatchObject({ design: null, enrolled: 0, rule: null, rate: null, test: null });
  });
  it('when a cohort has more decided patients than the chart draws, then the figures equal a patient-by-patient count and the thinned path keeps exact points and ends at the totals', async () => {
    // A fixed pseudo-random mix, evaluable population, more counting patients than n while stage 2 enrols (the threshold for the attained size applies).
    let seed = 7;
    const next = () => (seed = (seed * 1_103_515_245 + 12_345) % 2 ** 31) / 2 ** 31;
    const mix = Array.from({ length: 1_400 }, () => {
      const u = next();
      return u < 0.3 ? R : u < 0.8 ? N : u < 0.9 ? P : NE;
    });
    const design = { p0: 0.2, p1: 0.4, alpha: 0.05, r1: 40, n1: 300, r: 300, n: 1_100, analysisPopulation: 'evaluable' as const, cohortStatus: 'enrolling_stage_2' as const };
    const trial = await arrange(design, mix);
    const c = (await s.statistician.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0];
    const patients = (await countablePatients(stack.db, [trial.cohortIds[0]])).get(trial.cohortIds[0]) ?? [];
    const t = tally(patients, design.n1, design.analysisPopulation);
    expect(c).toMatchObject({ enrolled: t.enrolled, counted: t.counted, decided: t.decided, pending: t.pending, responders: t.responders, notEvaluable: t.notEvaluable });
    expect({ stage1: c.stage1, stage2: c.stage2 }).toEqual({ stage1: t.stage1, stage2: t.stage2 });
    expect(t.counted).toBeGreaterThan(design.n);
    expect(c.rule).toEqual(ruleState(design, design.cohortStatus, patients));
    expect(c.rule.threshold).toMatchObject({ n: t.counted, source: 'attained' });
    const full: Array<{ evaluable: number; responders: number }> = [];
    let responders = 0;
    for (const p of patients.filter((p) => p.evaluable && p.outcome !== 'pending')) {
      if (p.outcome === 'responder') responders += 1;
      full.push({ evaluable: full.length + 1, responders });
    }
    expect(full.length).toBeGreaterThan(PATH_POINTS);
    expect(c.path.length).toBeLessThanOrEqual(PATH_POINTS + 2);
    expect(c.path[0]).toEqual(full[0]);
    expect(c.path.at(-1)).toEqual({ evaluable: t.decided, responders: t.responders });
    for (const point of c.path) expect(point).toEqual(full[point.evaluable - 1]);
  }, 60_000);
});
