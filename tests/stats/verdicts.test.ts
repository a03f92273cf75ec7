/**
 * One verdict per cut: the worked cases of issue 14, each as a data-cut fixture with the verdict it
 * must give, and the rules they follow checked over many counts.
 *
 * Sources: the designs are Simon's (1989, Controlled Clinical Trials 10:1–10) — optimal 3/13, 12/43
 * for p0 0.20, p1 0.40, α 0.05, β 0.20 (Table 1, recalled from memory and confirmed by the engine's
 * exhaustive search, tests/stats/designs.test.ts); optimal 7/22, 17/46 for p0 0.30, p1 0.50, α 0.10,
 * β 0.10 and minimax 6/19, 16/39 for p0 0.30, p1 0.50, α 0.05, β 0.20 (recalled from memory, and
 * confirmed by the engine's search below). The single-stage 11/35 design for p0 0.20, p1 0.40, α 0.05,
 * β 0.20 is A'Hern's (2001) exact design (confirmed by the engine below). The stage-wise ordering is
 * Koyama & Chen's (2008, Statistics in Medicine 27:3145–3154); their §4 p-value is the sensitivity
 * figure, check value 0.0828 for the §4 example (the authors' published R implementation, see
 * tests/stats/koyama-chen.test.ts). Every threshold and p-value the issue quotes is recomputed here
 * by brute force from binomial sums that share no code with server/stats (tests/stats/reference.ts).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analyseCut, type CohortAnalysis } from '../../server/data-cuts/analysis.js';
import type { CutDesign, CutPatient, CutSnapshot } from '../../server/data-cuts/data-cuts.repository.js';
import type { CohortStatus } from '../../server/trials/trials.schema.js';
import {
  StatsInputError,
  cohortVerdict,
  koyamaChenPValue,
  simonDesigns,
  singleStageDesign,
  stageWisePValue,
  stageWiseThreshold,
  type VerdictDesign,
} from '../../server/stats/index.js';
import { verdictSentence } from '../../server/words/index.js';
import { binomUpper, promising } from './reference.js';
import { frozenPatients } from '../support/cut-patients.js';

type Spec = { outcome: CutPatient['outcome']; count: number };
const R = (count: number): Spec => ({ outcome: 'responder', count });
const N = (count: number): Spec => ({ outcome: 'non_responder', count });
const P = (count: number): Spec => ({ outcome: 'pending', count });

function design(d: Pick<CutDesign, 'p0' | 'p1' | 'alpha' | 'beta' | 'r1' | 'n1' | 'r' | 'n'>): CutDesign {
  return {
    id: 'design',
    version: 1,
    selection: d.r1 === null ? 'single_stage' : 'optimal',
    nmax: null,
    en0: 0,
    pet0: null,
    typeIError: 0,
    power: 0,
    analysisPopulation: 'all_enrolled',
    interimAccrual: 'continue_at_risk',
    sponsorSeesResponse: false,
    protocolReference: null,
    ...d,
  };
}

const OPTIMAL_20_40 = design({ p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2, r1: 3, n1: 13, r: 12, n: 43 });
const OPTIMAL_30_50 = design({ p0: 0.3, p1: 0.5, alpha: 0.1, beta: 0.1, r1: 7, n1: 22, r: 17, n: 46 });
const MINIMAX_30_50 = design({ p0: 0.3, p1: 0.5, alpha: 0.05, beta: 0.2, r1: 6, n1: 19, r: 16, n: 39 });
const SINGLE_20_40 = design({ p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2, r1: null, n1: null, r: 11, n: 35 });

function patients(specs: Spec[], cohortId: string): CutPatient[] {
  return frozenPatients(
    specs.flatMap((s) => Array.from({ length: s.count }, () => ({ outcome: s.outcome }))),
    cohortId,
    cohortId.toUpperCase(),
  );
}

type CohortSpec = { id?: string; design: CutDesign; status: CohortStatus; specs: Spec[] };

function analyse(kind: 'interim' | 'final', cohorts: CohortSpec[]) {
  const snapshot: CutSnapshot = {
    trial: { id: 't', code: 'TST-14', title: 'Verdict fixtures', indication: 'Invented', sponsorName: null },
    cohorts: cohorts.map((c, i) => ({ id: c.id ?? `cohort${i}`, code: (c.id ?? `cohort${i}`).toUpperCase(), name: 'Fixture', status: c.status, design: c.design })),
  };
  return analyseCut({
    cut: { id: 'cut', seq: 1, kind, cutAt: '2026-06-01T00:00:00.000Z', contentHash: 'h', cohortId: null },
    snapshot,
    patients: cohorts.flatMap((c, i) => patients(c.specs, c.id ?? `cohort${i}`)),
    prior: { a: null, b: null, thetaT: 0.9 },
    priorSource: 'saved',
  });
}

function cohortAt(kind: 'interim' | 'final', status: CohortStatus, d: CutDesign, specs: Spec[]): CohortAnalysis {
  return analyse(kind, [{ design: d, status, specs }]).cohorts[0];
}

/** The stage-wise p-value of a stage-2 outcome with total s over the design (r1, n1, stage 2 of m2), by brute force: P(X1 > r1, X1 + X2 ≥ s | p0). */
const bruteStageWise = (r1: number, n1: number, m2: number, s: number, p0: number) => promising(r1, n1, s - 1, n1 + m2, p0);

/** The largest r′ with "more than r′ responders ⇔ stage-wise p ≤ α", by scanning every total. */
function bruteThreshold(r1: number, n1: number, m2: number, p0: number, alpha: number): number {
  for (let s = r1 + 1; s <= n1 + m2; s++) if (bruteStageWise(r1, n1, m2, s, p0) <= alpha) return s - 1;
  return n1 + m2;
}

/** The single-stage threshold for n patients: the largest r′ with "more than r′ ⇔ P(X ≥ x | p0) ≤ α". */
function bruteSingleThreshold(n: number, p0: number, alpha: number): number {
  for (let x = 0; x <= n; x++) if (binomUpper(x - 1, n, p0) <= alpha) return x - 1;
  return n;
}

const RULE_WORDS = /r1′|adjusted/i;

describe('the designs of the worked cases', () => {
  it('when the engine searches Simon’s and A’Hern’s designs, then it finds the designs the fixtures use (Simon 1989; A’Hern 2001)', () => {
    expect(simonDesigns({ p0: 0.3, p1: 0.5, alpha: 0.1, beta: 0.1 }).optimal).toMatchObject({ r1: 7, n1: 22, r: 17, n: 46 });
    expect(simonDesigns({ p0: 0.3, p1: 0.5, alpha: 0.05, beta: 0.2 }).minimax).toMatchObject({ r1: 6, n1: 19, r: 16, n: 39 });
    expect(singleStageDesign({ p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2 })).toMatchObject({ r: 11, n: 35 });
  });

  it('when the planned sizes are attained, then the planned r is the threshold the p-value implies, so a page at plan cannot disagree with itself', () => {
    for (const d of [OPTIMAL_20_40, OPTIMAL_30_50, MINIMAX_30_50]) {
      expect(bruteThreshold(d.r1 as number, d.n1 as number, d.n - (d.n1 as number), d.p0, d.alpha)).toBe(d.r);
    }
    expect(bruteSingleThreshold(35, 0.2, 0.05)).toBe(11);
  });
});

describe('issue 14, rule 1: stage 1 is the first n1 counting patients; later ones are enrolled at risk', () => {
  it('when an interim cut of 3/13, 12/43 has 3 responders in the first 13 and 1 in patients 14–15, then the futility rule is met by stage 1 and 2 patients are at risk', () => {
    const c = cohortAt('interim', 'enrolling_stage_1', OPTIMAL_20_40, [R(3), N(10), R(1), N(1)]);
    // Futility: 3 ≤ r1 = 3 among the first n1 = 13 (Simon 1989's rule), whatever patients 14–15 show.
    expect(c.counts?.stage1).toMatchObject({ counted: 13, responders: 3 });
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'stop-futility', determinedEarly: false, atRisk: 2, threshold: { r: 3, n: 13, source: 'planned' } });
    expect(c.rule?.message).toBe('The futility rule is met: stage 1 ended with 3 responders among its 13 patients, not more than r1 = 3.');
    expect(c.rule?.atRiskNote).toMatch(/^2 patients counted beyond the first n1 = 13 are stage-2 patients enrolled at risk/);
    expect(c.deviation).toBeNull();
    expect(JSON.stringify(c)).not.toMatch(RULE_WORDS);
  });

  it('when the reverse case has 4 responders in the first 13 and 0 of 4 after, then stage 1 is passed and 4 patients are at risk', () => {
    const c = cohortAt('interim', 'enrolling_stage_1', OPTIMAL_20_40, [R(4), N(9), N(4)]);
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'continue', atRisk: 4 });
    expect(c.rule?.message).toBe('Stage 1 is passed: 4 responders among its 13 patients exceed r1 = 3.');
    expect(c.deviation).toBeNull();
    expect(JSON.stringify(c)).not.toMatch(RULE_WORDS);
  });

  it('when a final cut stopped at stage 1 with patients at risk, then the futility rule stands, there is no final-size deviation section and the inference leaves them out', () => {
    const c = cohortAt('final', 'stopped', OPTIMAL_20_40, [R(3), N(10), R(1), N(1)]);
    expect(c.rule).toMatchObject({ look: 'final', applied: 'stage1', decision: 'stop-futility', atRisk: 2 });
    expect(c.deviation).toBeNull();
    expect(c.inference).toMatchObject({ x1: 3, n1: 13, x2: null });
    // Stage-wise p after a stop at stage 1: P(X1 ≥ 3 | 13, 0.2) (Koyama & Chen 2008's ordering).
    expect(c.inference?.pValue).toBeCloseTo(binomUpper(2, 13, 0.2), 12);
  });
});

describe('issue 14, rule 2: a final verdict follows the stage-wise p-value over the attained design', () => {
  const issueCase = () => cohortAt('final', 'final_analysis', OPTIMAL_30_50, [R(9), N(13), R(8), N(13)]);

  it('when a final cut of 7/22, 17/46 at α 0.1 has 43 patients with 9 + 8 responders, then p = 0.0986 ≤ 0.1, r′ = 16 and the verdict is promising', () => {
    const c = issueCase();
    const p = bruteStageWise(7, 22, 21, 17, 0.3);
    expect(p.toFixed(4)).toBe('0.0986');
    expect(bruteThreshold(7, 22, 21, 0.3, 0.1)).toBe(16);
    expect(c.rule).toMatchObject({ look: 'final', applied: 'final', decision: 'promising', determinedEarly: false, threshold: { r: 16, n: 43, source: 'attained' } });
    expect(c.rule?.finalTest?.pValue).toBeCloseTo(p, 12);
    expect(c.inference?.pValue).toBe(c.rule?.finalTest?.pValue);
    expect(c.rule?.message).toBe(
      'Promising: 17 responders among 43 exceed r′ = 16 for the attained 43 patients; stage-wise p = 0.0986 ≤ α = 0.1. r′ = 16 is the threshold the stage-wise p-value over the attained design implies: more than r′ responders exactly when p ≤ α.',
    );
    expect(JSON.stringify(c)).not.toMatch(/remain/);
    expect(c.deviation).toMatchObject({ plannedN1: 22, attainedN1: 22, plannedN: 46, attainedN: 43, applied: { r1: 7, r: 16 } });
    // The thresholds as applied keep the exact type I error within α: P(X1 > 7, X1 + X2 > 16 | p0) at the attained sizes.
    expect(c.deviation?.applied.characteristics?.typeIError).toBeCloseTo(promising(7, 22, 16, 43, 0.3), 12);
    expect(c.deviation?.applied.characteristics?.typeIError).toBeLessThanOrEqual(0.1);
  });

  it('when the same cut is analysed, then Koyama & Chen’s §4 figure sits beside the primary p-value and agrees, so no disagreement is said', () => {
    const c = issueCase();
    const kc = koyamaChenPValue({ r1: 7, n1: 22, r: 17, n: 46, p0: 0.3 }, { x1: 9, x2: 8, m2: 21 });
    expect(c.inference?.sensitivity).toEqual({ pValue: kc, agrees: true });
    expect(kc).toBeLessThanOrEqual(0.1);
    expect(c.rule?.sensitivityNote).toBeNull();
  });

  it('when one responder fewer reaches the same cut, then p > α, r′ = 16 still and the verdict is not promising: threshold and p-value never disagree', () => {
    const c = cohortAt('final', 'final_analysis', OPTIMAL_30_50, [R(9), N(13), R(7), N(14)]);
    expect(bruteStageWise(7, 22, 21, 16, 0.3)).toBeGreaterThan(0.1);
    expect(c.rule).toMatchObject({ decision: 'not-promising', threshold: { r: 16, n: 43 } });
    expect(c.rule?.finalTest?.pValue).toBeGreaterThan(0.1);
  });

  it('when the primary p-value and Koyama & Chen’s §4 figure fall on different sides of α (x1 10, x2 7 of 21), then the page says so and the verdict follows the primary figure', () => {
    const c = cohortAt('final', 'final_analysis', OPTIMAL_30_50, [R(10), N(12), R(7), N(14)]);
    const kc = koyamaChenPValue({ r1: 7, n1: 22, r: 17, n: 46, p0: 0.3 }, { x1: 10, x2: 7, m2: 21 });
    expect(bruteStageWise(7, 22, 21, 17, 0.3)).toBeLessThanOrEqual(0.1);
    expect(kc).toBeGreaterThan(0.1);
    expect(c.rule?.decision).toBe('promising');
    expect(c.inference?.sensitivity).toEqual({ pValue: kc, agrees: false });
    expect(c.rule?.sensitivityNote).toMatch(/disagree about p ≤ α = 0\.1\. The verdict follows the primary figure/);
  });

  it('when a final cut of the minimax 6/19, 16/39 has x1 7 of 19 and x2 10 of 23 (Koyama & Chen 2008 §4 example), then the sensitivity figure is 0.0828', () => {
    const c = cohortAt('final', 'final_analysis', MINIMAX_30_50, [R(7), N(12), R(10), N(13)]);
    expect(c.inference?.sensitivity?.pValue).toBeCloseTo(0.0828, 4);
    // Primary: P(X1 > 6, X1 + X2 ≥ 17 | 19, 23, 0.3) — above α 0.05, like the §4 figure.
    expect(c.inference?.pValue).toBeCloseTo(bruteStageWise(6, 19, 23, 17, 0.3), 12);
    expect(c.rule).toMatchObject({ decision: 'not-promising', threshold: { r: bruteThreshold(6, 19, 23, 0.3, 0.05), n: 42 } });
    expect(c.inference?.sensitivity?.agrees).toBe(true);
  });

  it('when any stage-2 outcome is judged at any attained stage-2 size, then promising ⇔ p ≤ α ⇔ more than r′ responders, and r′ is the brute-force threshold (property)', () => {
    const d: VerdictDesign = { r1: 7, n1: 22, r: 17, n: 46, p0: 0.3, alpha: 0.1 };
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 48 }), fc.integer({ min: 8, max: 22 }), fc.nat(), (m2, x1, seed) => {
        const x2 = seed % (m2 + 1);
        const stage = (counted: number, responders: number) => ({ counted, decided: counted, responders, pending: 0 });
        const v = cohortVerdict(d, { stage1: stage(22, x1), stage2: stage(m2, x2) }, 'final');
        const p = stageWisePValue({ r1: 7, n1: 22, r: 17, n: 46, p0: 0.3 }, { x1, x2, n2Actual: m2 });
        expect(v.decision === 'promising').toBe(p <= 0.1);
        expect(v.decision === 'promising').toBe(x1 + x2 > v.threshold.r);
        expect(v.finalTest?.pValue).toBe(p);
        expect(v.threshold.r).toBe(m2 === 24 ? 17 : bruteThreshold(7, 22, m2, 0.3, 0.1));
      }),
      { numRuns: 200 },
    );
  });

  it('when the threshold is asked for directly, then it is the brute-force threshold over a grid of attained sizes', () => {
    for (let m2 = 0; m2 <= 60; m2 += 3) expect(stageWiseThreshold({ r1: 3, n1: 13, p0: 0.2 }, m2, 0.05)).toBe(bruteThreshold(3, 13, m2, 0.2, 0.05));
  });
});

describe('issue 14, rule 3: single-stage looks use the threshold for the attained n', () => {
  it('when 11/35 has 12 responders among 39 patients, then the interim and the final cut agree: not promising, r′ = 12 for 39', () => {
    expect(bruteSingleThreshold(39, 0.2, 0.05)).toBe(12);
    const interim = cohortAt('interim', 'enrolling_stage_1', SINGLE_20_40, [R(12), N(27)]);
    const final = cohortAt('final', 'final_analysis', SINGLE_20_40, [R(12), N(27)]);
    for (const c of [interim, final]) {
      expect(c.rule).toMatchObject({ applied: 'final', decision: 'not-promising', threshold: { r: 12, n: 39, source: 'attained' } });
      expect(c.deviation).toMatchObject({ plannedN: 35, attainedN: 39, applied: { r1: null, r: 12 } });
    }
    expect(final.rule?.finalTest?.pValue).toBeCloseTo(binomUpper(11, 39, 0.2), 12);
    expect(final.rule?.finalTest?.pValue).toBeGreaterThan(0.05);
  });

  it('when a single-stage cohort has counted at least n with no pending outcome, then an interim and a final look always agree (property)', () => {
    const d: VerdictDesign = { r1: null, n1: null, r: 11, n: 35, p0: 0.2, alpha: 0.05 };
    fc.assert(
      fc.property(fc.integer({ min: 35, max: 80 }), fc.nat(), (n, seed) => {
        const x = seed % (n + 1);
        const counts = { stage1: { counted: n, decided: n, responders: x, pending: 0 }, stage2: { counted: 0, decided: 0, responders: 0, pending: 0 } };
        const interim = cohortVerdict(d, counts, 'stage-1');
        const final = cohortVerdict(d, counts, 'final');
        expect(interim.decision).toBe(final.decision);
        expect(final.threshold.r).toBe(bruteSingleThreshold(n, 0.2, 0.05));
      }),
      { numRuns: 100 },
    );
  });
});

describe('issue 14, rule 4: a verdict pending outcomes could change is not yet decided', () => {
  it('when an over-run final of 3/13, 12/43 has 12 responders among 43 decided and 4 outcomes pending of 47, then it is not yet decided and the 4 pending can change it', () => {
    const c = cohortAt('final', 'final_analysis', OPTIMAL_20_40, [R(5), N(8), R(7), N(23), P(4)]);
    expect(bruteThreshold(3, 13, 34, 0.2, 0.05)).toBe(13);
    expect(c.rule).toMatchObject({
      look: 'final',
      decision: 'undetermined',
      responders: 12,
      decided: 43,
      threshold: { r: 13, n: 47, source: 'attained' },
      pendingThatCanChange: 4,
      placesLeft: 0,
      toSettle: { responders: 2, nonResponders: 3 },
    });
    expect(c.rule?.message).toMatch(/^Not yet decided: 12 responders among 43 decided; 4 pending outcomes can still change it\./);
    expect(c.rule?.message).not.toMatch(/remain/);
  });

  it('when the 4 pending outcomes come in, then 2 responders among them make it promising and none leaves it not promising', () => {
    expect(cohortAt('final', 'final_analysis', OPTIMAL_20_40, [R(5), N(8), R(7), N(23), R(2), N(2)]).rule?.decision).toBe('promising');
    expect(cohortAt('final', 'final_analysis', OPTIMAL_20_40, [R(5), N(8), R(7), N(23), N(4)]).rule?.decision).toBe('not-promising');
  });

  it('when an under-run final has pending outcomes that cannot change it, then it is settled and no patient is said to remain', () => {
    const c = cohortAt('final', 'final_analysis', OPTIMAL_30_50, [R(9), N(13), R(10), N(11), P(2)]);
    expect(c.rule).toMatchObject({ decision: 'promising', determinedEarly: true, pendingThatCanChange: 0 });
    expect(c.rule?.message).toMatch(/^Promising: 19 responders among 43 decided already exceed r′ = \d+ for the attained 45 patients; the 2 pending outcomes cannot change that\./);
    expect(c.rule?.message).not.toMatch(/remain/);
  });

  it('when any final look is worded, then no sentence says that patients remain (property)', () => {
    const d: VerdictDesign = { r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 };
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 13 }), fc.nat(), fc.nat(), fc.integer({ min: 0, max: 40 }), fc.nat(), fc.nat(), (c1, d1seed, x1seed, c2, d2seed, x2seed) => {
        const d1 = d1seed % (c1 + 1);
        const x1 = x1seed % (d1 + 1);
        const counted2 = c1 === 13 ? c2 : 0;
        const d2 = d2seed % (counted2 + 1);
        const x2 = x2seed % (d2 + 1);
        const v = cohortVerdict(d, { stage1: { counted: c1, decided: d1, responders: x1, pending: c1 - d1 }, stage2: { counted: counted2, decided: d2, responders: x2, pending: counted2 - d2 } }, 'final');
        expect(v.placesLeft).toBe(0);
        expect(verdictSentence(v, d)).not.toMatch(/remain|still to enrol/);
        if (v.decision === 'undetermined') expect(v.pendingThatCanChange).toBeGreaterThan(0);
      }),
      { numRuns: 300 },
    );
  });
});

describe('issue 14, rule 5: the predictive probability and multiplicity follow the final analysis', () => {
  it('when a final cut is analysed, then the predictive probability projects to the attained size, not the planned n', () => {
    const c = cohortAt('final', 'final_analysis', OPTIMAL_20_40, [R(5), N(8), R(7), N(23), P(4)]);
    expect(c.bayes?.nmax).toBe(47);
    const interim = cohortAt('interim', 'enrolling_stage_2', OPTIMAL_20_40, [R(5), N(8), R(3), N(4)]);
    expect(interim.bayes?.nmax).toBe(43);
  });

  it('when cohorts are compared at a final cut, then Holm and Benjamini–Hochberg use the stage-wise p-value of each two-stage cohort', () => {
    const analysis = analyse('final', [
      { id: 'a', design: OPTIMAL_30_50, status: 'final_analysis', specs: [R(9), N(13), R(8), N(13)] },
      { id: 'b', design: OPTIMAL_20_40, status: 'final_analysis', specs: [R(4), N(9), R(6), N(24)] },
      { id: 'c', design: SINGLE_20_40, status: 'final_analysis', specs: [R(10), N(25)] },
    ]);
    const rows = analysis.multiplicity?.rows ?? [];
    expect(rows.map((r) => r.basis)).toEqual(['stage-wise', 'stage-wise', 'exact-binomial']);
    expect(rows[0].pValue).toBeCloseTo(bruteStageWise(7, 22, 21, 17, 0.3), 12);
    expect(rows[1].pValue).toBeCloseTo(bruteStageWise(3, 13, 30, 10, 0.2), 12);
    expect(rows[2].pValue).toBeCloseTo(binomUpper(9, 35, 0.2), 12);
    expect(rows.map((r) => r.pValue)).toEqual(analysis.cohorts.map((c) => c.rule?.finalTest?.pValue));
  });

  it('when the analysis is read, then it states the rules for the report', () => {
    const analysis = analyse('interim', [{ design: OPTIMAL_20_40, status: 'enrolling_stage_1', specs: [R(1)] }]);
    expect(analysis.rulesStatement[0]).toMatch(/^Stage 1 is the first n1 counting patients/);
    expect(analysis.rulesStatement.join(' ')).toMatch(/Koyama & Chen/);
  });
});

describe('cohortVerdict validation', () => {
  const d: VerdictDesign = { r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 };
  const none = { counted: 0, decided: 0, responders: 0, pending: 0 };

  it('when the counts do not add up, then a StatsInputError names the field', () => {
    expect(() => cohortVerdict(d, { stage1: { counted: 5, decided: 4, responders: 1, pending: 0 }, stage2: none }, 'stage-1')).toThrow(StatsInputError);
    expect(() => cohortVerdict(d, { stage1: { counted: 14, decided: 14, responders: 1, pending: 0 }, stage2: none }, 'stage-1')).toThrow(/first n1 = 13/);
    expect(() => cohortVerdict(d, { stage1: { counted: 12, decided: 12, responders: 1, pending: 0 }, stage2: { counted: 1, decided: 1, responders: 0, pending: 0 } }, 'final')).toThrow(/once stage 1 holds n1/);
    expect(() => cohortVerdict({ ...d, alpha: 1 }, { stage1: none, stage2: none }, 'final')).toThrow(/alpha/);
    expect(() => cohortVerdict(d, { stage1: none, stage2: none }, 'later' as never)).toThrow(/look/);
  });
});
