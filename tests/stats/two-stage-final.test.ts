/**
 * The final analysis of a data cut after a two-stage design, checked from patient rows to figures:
 * the cut's inference is the engine's on the counts under the protocol's population, the actual
 * stage sizes are used, and the estimators keep the properties their sources define.
 * No published worked example is recalled here with enough confidence to quote its digits; the
 * checks below are against the definitions, computed independently in this file.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analyseCut } from '../../server/data-cuts/analysis.js';
import type { CutDesign, CutPatient, CutSnapshot } from '../../server/data-cuts/data-cuts.repository.js';
import { frozenPatients, type FrozenSpec } from '../support/cut-patients.js';
import { twoStageInference } from '../../server/stats/index.js';

const OPTIMAL: CutDesign = {
  id: 'design',
  version: 1,
  selection: 'optimal',
  p0: 0.2,
  p1: 0.4,
  alpha: 0.05,
  beta: 0.2,
  nmax: null,
  r1: 3,
  n1: 13,
  r: 12,
  n: 43,
  en0: 20.6,
  pet0: 0.75,
  typeIError: 0.0465,
  power: 0.8,
  analysisPopulation: 'all_enrolled',
  interimAccrual: 'pause',
  sponsorSeesResponse: false,
  protocolReference: null,
};

const patients = (specs: FrozenSpec[]) => frozenPatients(specs);

const run = (k: number, outcome: CutPatient['outcome']) => Array.from({ length: k }, () => ({ outcome }));

function finalAnalysis(rows: CutPatient[], design: CutDesign = OPTIMAL) {
  const snapshot: CutSnapshot = {
    trial: { id: 't', code: 'TST-1', title: 'Test', indication: 'Test', sponsorName: null },
    cohorts: [{ id: 'cohort', code: 'MAIN', name: 'All', status: 'final_analysis', design }],
  };
  return analyseCut({
    cut: { id: 'cut', seq: 1, kind: 'final', cutAt: '2026-06-01T00:00:00.000Z', contentHash: 'h', cohortId: 'cohort' },
    snapshot,
    patients: rows,
    prior: { a: null, b: null, thetaT: 0.9 },
    priorSource: 'saved',
  }).cohorts[0];
}

/** log C(n, k), exactly enough for these sizes. */
function lchoose(n: number, k: number): number {
  let s = 0;
  for (let i = 1; i <= k; i++) s += Math.log(n - k + i) - Math.log(i);
  return s;
}
const pmf = (k: number, n: number, p: number) => Math.exp(lchoose(n, k) + k * Math.log(p) + (n - k) * Math.log1p(-p));

/** Every outcome of the design (x1, and x2 when stage 2 was reached) with its probability at p. */
function sampleSpace(r1: number, n1: number, n2: number, p: number) {
  const outcomes: Array<{ x1: number; x2?: number; prob: number }> = [];
  for (let x1 = 0; x1 <= n1; x1++) {
    if (x1 <= r1) outcomes.push({ x1, prob: pmf(x1, n1, p) });
    else for (let x2 = 0; x2 <= n2; x2++) outcomes.push({ x1, x2, prob: pmf(x1, n1, p) * pmf(x2, n2, p) });
  }
  return outcomes;
}

describe('the final analysis of a cut after a two-stage design', () => {
  it('when the cohort completed both stages, then the cut’s inference is the engine’s on x1 = 4 of 13 and x2 = 10 of 30', () => {
    const c = finalAnalysis(patients([...run(4, 'responder'), ...run(9, 'non_responder'), ...run(10, 'responder'), ...run(20, 'non_responder')]));
    const engine = twoStageInference({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2 }, { x1: 4, x2: 10, n2Actual: 30, confLevel: 0.95 });
    expect(c.inference).toMatchObject({ ...engine, x1: 4, n1: 13, x2: 10, n2Actual: 30 });
    expect(c.rule?.decision).toBe('promising');
  });

  it('when the stage-wise p-value is summed here from its definition (Koyama & Chen 2008), then it equals the cut’s', () => {
    const c = finalAnalysis(patients([...run(4, 'responder'), ...run(9, 'non_responder'), ...run(10, 'responder'), ...run(20, 'non_responder')]));
    // Stage-wise ordering: a stage-2 outcome with total s is at least as extreme as (x1, x2) when it reached stage 2 and its total ≥ 14.
    const direct = sampleSpace(3, 13, 30, 0.2)
      .filter((o) => o.x2 !== undefined && o.x1 + o.x2 >= 14)
      .reduce((sum, o) => sum + o.prob, 0);
    expect(c.inference?.pValue).toBeCloseTo(direct, 12);
  });

  it('when the cohort stopped at stage 1, then the inference is that of x1 of n1 and later patients are left out with a note', () => {
    const c = finalAnalysis(patients([...run(2, 'responder'), ...run(11, 'non_responder'), ...run(2, 'responder')]));
    expect(c.inference).toMatchObject({ x1: 2, n1: 13, x2: null, n2Actual: 0, umvue: 2 / 13, naiveEstimate: 2 / 13 });
    expect(c.inference?.note).toMatch(/not part of the stage-wise inference/);
  });

  it('when stage 2 fell short of plan, then the actual stage-2 size defines the inference and the deviation is shown', () => {
    const c = finalAnalysis(patients([...run(4, 'responder'), ...run(9, 'non_responder'), ...run(9, 'responder'), ...run(15, 'non_responder')]));
    const engine = twoStageInference({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2 }, { x1: 4, x2: 9, n2Actual: 24 });
    expect(c.inference?.pValue).toBe(engine.pValue);
    expect(c.inference?.n2Actual).toBe(24);
    expect(c.inference?.note).toMatch(/instead of the planned 30/);
    expect(c.deviation).toMatchObject({ plannedN: 43, attainedN: 37, attainedN1: 13, applied: { r1: 3, r: c.rule?.threshold.r } });
    expect(c.deviation?.applied.characteristics?.typeIError).toBeLessThanOrEqual(0.05);
  });

  it('when a patient is not evaluable and all enrolled count, then they count as a non-responder in stage 1', () => {
    const c = finalAnalysis(patients([...run(4, 'responder'), { outcome: 'pending', evaluable: false }, ...run(8, 'non_responder'), ...run(12, 'responder'), ...run(18, 'non_responder')]));
    expect(c.inference).toMatchObject({ x1: 4, n1: 13, x2: 12, n2Actual: 30 });
  });

  it('when pending outcomes remain, then they are left out of the inference and the note says so', () => {
    const c = finalAnalysis(patients([...run(4, 'responder'), ...run(9, 'non_responder'), ...run(10, 'responder'), ...run(18, 'non_responder'), ...run(2, 'pending')]));
    expect(c.inference?.n2Actual).toBe(28);
    expect(c.inference?.note).toMatch(/2 pending outcomes left out/);
  });
});

describe('properties of the two-stage inference on final cuts', () => {
  const design = { r1: 3, n1: 13, r: 12, n: 43, p0: 0.2 };

  it('when more stage-2 responders are seen, then the stage-wise p-value never rises (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 4, max: 13 }), fc.integer({ min: 0, max: 29 }), (x1, x2) => {
        const a = twoStageInference(design, { x1, x2 });
        const b = twoStageInference(design, { x1, x2: x2 + 1 });
        expect(b.pValue).toBeLessThanOrEqual(a.pValue + 1e-12);
      }),
    );
  });

  it('when the p-value is below the interval’s tail, then p0 lies below the lower limit, and not otherwise (duality, property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 4, max: 13 }), fc.integer({ min: 0, max: 30 }), (x1, x2) => {
        const { pValue, ci } = twoStageInference(design, { x1, x2, confLevel: 0.95 });
        if (Math.abs(pValue - 0.025) > 1e-9 && Math.abs(ci[0] - design.p0) > 1e-9) expect(pValue < 0.025).toBe(ci[0] > design.p0);
        expect(ci[0]).toBeLessThan(ci[1]);
      }),
    );
  });

  it('when averaged over the whole sample space, then the UMVUE has expectation p (unbiased) and the naive estimate does not (Jung & Kim 2004)', () => {
    for (const p of [0.1, 0.2, 0.3, 0.4, 0.6]) {
      let umvue = 0;
      let naive = 0;
      for (const o of sampleSpace(3, 13, 30, p)) {
        const result = twoStageInference(design, o.x2 === undefined ? { x1: o.x1 } : { x1: o.x1, x2: o.x2 });
        umvue += o.prob * result.umvue;
        naive += o.prob * result.naiveEstimate;
      }
      expect(umvue).toBeCloseTo(p, 10);
      expect(Math.abs(naive - p)).toBeGreaterThan(1e-4);
    }
  });
});
