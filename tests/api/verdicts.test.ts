/**
 * One verdict per cohort: on the same patients, the live evaluation (Trial overview) and a data cut
 * give the same verdict with the same words, over HTTP against the real stack. The worked cases are
 * issue 14's (their figures are checked by brute force in tests/stats/verdicts.test.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import { arrangeCohort, freezeCutDirectly, outcomes } from '../support/data-cut-factories.js';
import type { DirectDesign, DirectPatient } from '../support/patient-factories.js';

let stack: Stack;
let sam: Session;

beforeAll(async () => {
  stack = await startStack();
  sam = await stack.signIn(DEMO.statistician);
});
afterAll(async () => stack?.close());

const pending = (k: number): DirectPatient[] => Array.from({ length: k }, () => ({ outcome: 'pending' }));

/** The live verdict and the verdict of a cut frozen now, for a cohort arranged with these patients. */
async function liveAndCut(design: Partial<DirectDesign>, patients: DirectPatient[], kind: 'interim' | 'final') {
  const trial = await createTrial(stack.db);
  const { cohortId } = await arrangeCohort(stack.db, trial, { design, patients: { SA: patients } });
  const live = (await sam.get(`/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0].rule;
  const cut = await freezeCutDirectly(stack.db, trial, { cohortId, kind });
  const analysis = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis;
  return { live, cut: analysis.cohorts[0].rule, analysis, cutId: cut.id };
}

describe('the live evaluation and a data cut on the same patients', () => {
  it('when stage 1 of 3/13, 12/43 met the futility rule and 2 patients were enrolled at risk, then both say futility with 2 at risk', async () => {
    const { live, cut } = await liveAndCut({ interimAccrual: 'continue_at_risk' }, [...outcomes(3, 10), ...outcomes(1, 1)], 'interim');
    expect(cut).toMatchObject({ look: 'stage-1', decision: 'stop-futility', atRisk: 2 });
    expect(live).toEqual(cut);
  });

  it('when 4 of the first 13 responded and 0 of 4 after, then both say stage 1 is passed with 4 at risk', async () => {
    const { live, cut } = await liveAndCut({ interimAccrual: 'continue_at_risk' }, [...outcomes(4, 9), ...outcomes(0, 4)], 'interim');
    expect(cut).toMatchObject({ decision: 'continue', atRisk: 4 });
    expect(live).toEqual(cut);
  });

  it('when a final analysis of 7/22, 17/46 at α 0.1 has 9 + 8 responders among 43, then both say promising from p = 0.0986 with r′ = 16 and the sensitivity figure', async () => {
    const design = { p0: 0.3, p1: 0.5, alpha: 0.1, beta: 0.1, r1: 7, n1: 22, r: 17, n: 46, cohortStatus: 'final_analysis' };
    const { live, cut } = await liveAndCut(design, [...outcomes(9, 13), ...outcomes(8, 13)], 'final');
    expect(cut).toMatchObject({ look: 'final', decision: 'promising', threshold: { r: 16, n: 43, source: 'attained' } });
    expect(cut.finalTest.pValue.toFixed(4)).toBe('0.0986');
    expect(cut.finalTest.sensitivity).toMatchObject({ agrees: true });
    expect(cut.message).not.toMatch(/remain/);
    expect(live).toEqual(cut);
  });

  it('when an over-run final of 3/13, 12/43 has 12 responders among 43 decided and 4 pending, then both say not yet decided with the 4 pending', async () => {
    const { live, cut } = await liveAndCut({ cohortStatus: 'final_analysis' }, [...outcomes(5, 8), ...outcomes(7, 23), ...pending(4)], 'final');
    expect(cut).toMatchObject({ decision: 'undetermined', pendingThatCanChange: 4, placesLeft: 0, threshold: { r: 13, n: 47 } });
    expect(live).toEqual(cut);
  });

  it('when a single-stage 11/35 cohort has 12 responders among 39, then the live look, an interim cut and a final cut all say not promising', async () => {
    const design = { r1: null, n1: null, r: 11, n: 35 };
    const interim = await liveAndCut(design, outcomes(12, 27), 'interim');
    const final = await liveAndCut(design, outcomes(12, 27), 'final');
    for (const rule of [interim.live, interim.cut, final.cut]) expect(rule).toMatchObject({ decision: 'not-promising', threshold: { r: 12, n: 39 } });
    expect(interim.live).toEqual(interim.cut);
  });
});
