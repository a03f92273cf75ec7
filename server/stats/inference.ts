/**
 * Inference at the end of a two-stage trial, where the naive binomial p-value and interval ignore the
 * stopping rule. This is the primary analysis behind a final verdict.
 *
 * Stage-wise ordering over the attained design: every outcome that stopped after stage 1 ranks below
 * every outcome that went on; stage-1 outcomes are ordered by x1, stage-2 outcomes by the total x1 + x2.
 * The p-value is P(outcome at least as high | p0); the interval inverts the two tail probabilities,
 * which are monotone in p. The UMVUE is Jung & Kim's (2004) Rao–Blackwell estimator. With the planned
 * stage 2 this is the ordering Koyama & Chen (2008) use; an actual stage 2 of another size (n2Actual = m2)
 * applies the same ordering to the sample space with the attained m2, as if m2 had been planned, which is
 * valid when m2 does not depend on the data. Koyama & Chen's own answer to m2 ≠ n2 (their §4: planned
 * design kept, stage 2 carried through a conditional p-value) is `koyamaChenPValue` (koyama-chen.ts), the
 * sensitivity figure reported beside this one.
 */
import { StatsInputError, requireAtMost, requireCount, requireOpenUnit } from './errors.js';
import { binomialCdf, binomialSf, proportionInterval } from './binomial.js';
import { binomialLogPmf, lchoose } from './special.js';

export interface InferenceDesign {
  r1: number;
  n1: number;
  r: number;
  n: number;
  p0: number;
}

export interface TwoStageObservation {
  x1: number;
  /** Stage-2 responders; absent when the trial stopped after stage 1. */
  x2?: number;
  /** Actual stage-2 size when it differs from n − n1. */
  n2Actual?: number;
  confLevel?: number;
}

export interface TwoStageInference {
  pValue: number;
  ci: [number, number];
  umvue: number;
  naiveEstimate: number;
  naiveCi: [number, number];
}

/** P(T ≥ t) for a stage-2 outcome with total s: the stage-1 pass and then enough stage-2 responders. */
function upperTail(p: number, r1: number, n1: number, n2: number, s: number): number {
  let total = 0;
  for (let x1 = r1 + 1; x1 <= n1; x1++) total += Math.exp(binomialLogPmf(x1, n1, p)) * binomialSf(s - x1 - 1, n2, p);
  return total;
}

/** P(T ≤ t) for a stage-2 outcome with total s: every stage-1 stop, plus stage-2 totals up to s. */
function lowerTail(p: number, r1: number, n1: number, n2: number, s: number): number {
  let total = binomialCdf(r1, n1, p);
  for (let x1 = r1 + 1; x1 <= n1; x1++) total += Math.exp(binomialLogPmf(x1, n1, p)) * binomialCdf(s - x1, n2, p);
  return total;
}

/** The p in (0, 1) where a monotone tail probability crosses `target`, by bisection on the log-odds. */
function solveInP(tail: (p: number) => number, target: number, increasing: boolean): number {
  let lo = -60;
  let hi = 60;
  for (let i = 0; i < 200 && hi - lo > 1e-13; i++) {
    const mid = (lo + hi) / 2;
    const above = tail(1 / (1 + Math.exp(-mid))) > target;
    if (above === increasing) hi = mid;
    else lo = mid;
  }
  return 1 / (1 + Math.exp(-(lo + hi) / 2));
}

/** Rao–Blackwell estimator given a stage-2 total s: E[X1/n1 | S = s, stage 2 reached], in log space. */
function umvueAfterStageTwo(r1: number, n1: number, n2: number, s: number): number {
  const numerator: number[] = [];
  const denominator: number[] = [];
  for (let x1 = Math.max(r1 + 1, s - n2); x1 <= Math.min(s, n1); x1++) {
    numerator.push(lchoose(n1 - 1, x1 - 1) + lchoose(n2, s - x1));
    denominator.push(lchoose(n1, x1) + lchoose(n2, s - x1));
  }
  return Math.exp(logSumExp(numerator) - logSumExp(denominator));
}

function logSumExp(terms: number[]): number {
  const top = Math.max(...terms);
  let sum = 0;
  for (const t of terms) sum += Math.exp(t - top);
  return top + Math.log(sum);
}

export function validateDesign(design: InferenceDesign): void {
  if (typeof design !== 'object' || design === null) throw new StatsInputError('design', 'A design with r1, n1, r, n and p0 is required.');
  const n = requireCount('n', design.n, 1);
  const n1 = requireCount('n1', design.n1, 1);
  const r1 = requireCount('r1', design.r1);
  const r = requireCount('r', design.r);
  requireOpenUnit('p0', design.p0);
  // n1 = n is allowed: a single-stage trial seen as a two-stage one with an empty stage 2.
  requireAtMost('n1', n1, 'n', n);
  if (r1 >= n1) throw new StatsInputError('r1', `r1 (${r1}) must be less than n1 (${n1}).`);
  if (r < r1 || r >= n) throw new StatsInputError('r', `r (${r}) must be at least r1 (${r1}) and less than n (${n}).`);
}

/** The observation checked against the design: x1, and x2 with the stage-2 size when stage 2 was reached. */
function validateObservation(design: InferenceDesign, observed: TwoStageObservation) {
  validateDesign(design);
  if (typeof observed !== 'object' || observed === null) throw new StatsInputError('x1', 'The observed stage-1 responders x1 are required.');
  const { r1, n1 } = design;
  const x1 = requireCount('x1', observed.x1);
  requireAtMost('x1', x1, 'n1', n1);
  const n2 = observed.n2Actual === undefined ? design.n - n1 : requireCount('n2Actual', observed.n2Actual);
  if (x1 <= r1) {
    if (observed.x2 !== undefined) {
      throw new StatsInputError('x2', `The trial stops after stage 1 when x1 (${x1}) ≤ r1 (${r1}); x2 must be absent.`);
    }
    return { x1, stoppedEarly: true as const, x2: 0, n2 };
  }
  if (observed.x2 === undefined && n2 > 0) {
    throw new StatsInputError('x2', `x1 (${x1}) exceeds r1 (${r1}), so the trial went on to stage 2: x2 is required.`);
  }
  const x2 = requireCount('x2', observed.x2 ?? 0);
  requireAtMost('x2', x2, 'the stage-2 size', n2);
  return { x1, stoppedEarly: false as const, x2, n2 };
}

type CheckedObservation = ReturnType<typeof validateObservation>;

/** P(an outcome ranking at least as high as the observed one | p0) under the stage-wise ordering. */
function pValueOf({ r1, n1, p0 }: InferenceDesign, { x1, stoppedEarly, x2, n2 }: CheckedObservation): number {
  return stoppedEarly ? binomialSf(x1 - 1, n1, p0) : Math.min(1, upperTail(p0, r1, n1, n2, x1 + x2));
}

/** The stage-wise p-value alone, without the interval: what a verdict and a multiplicity adjustment need. */
export function stageWisePValue(design: InferenceDesign, observed: Omit<TwoStageObservation, 'confLevel'>): number {
  return pValueOf(design, validateObservation(design, observed));
}

/**
 * The final threshold r′ a stage-wise p-value implies for a design that reached stage 2 with n2
 * patients: more than r′ responders in all exactly when the p-value is at most α. For a stage-2
 * outcome the p-value depends on the total only and falls as it rises, so r′ is one less than the
 * smallest total at or below α (at least r1); n1 + n2 when no total is enough.
 */
export function stageWiseThreshold(design: Pick<InferenceDesign, 'r1' | 'n1' | 'p0'>, n2: number, alpha: number): number {
  const n1 = requireCount('n1', design.n1, 1);
  const r1 = requireCount('r1', design.r1);
  if (r1 >= n1) throw new StatsInputError('r1', `r1 (${r1}) must be less than n1 (${n1}).`);
  const p0 = requireOpenUnit('p0', design.p0);
  requireCount('n2', n2);
  requireOpenUnit('alpha', alpha);
  let lo = r1 + 1;
  let hi = n1 + n2 + 1;
  while (lo < hi) {
    const mid = Math.floor((lo + hi) / 2);
    if (Math.min(1, upperTail(p0, r1, n1, n2, mid)) <= alpha) hi = mid;
    else lo = mid + 1;
  }
  return lo - 1;
}

export function twoStageInference(design: InferenceDesign, observed: TwoStageObservation): TwoStageInference {
  const checked = validateObservation(design, observed);
  const { x1, stoppedEarly, x2, n2 } = checked;
  const { r1, n1 } = design;
  const confLevel = requireOpenUnit('confLevel', observed.confLevel ?? 0.95);
  const tail = (1 - confLevel) / 2;
  const pValue = pValueOf(design, checked);
  if (stoppedEarly) {
    const ci = proportionInterval(x1, n1, { confLevel });
    return { pValue, ci, umvue: x1 / n1, naiveEstimate: x1 / n1, naiveCi: ci };
  }
  const s = x1 + x2;
  const total = n1 + n2;
  const upper = (p: number) => upperTail(p, r1, n1, n2, s);
  const lower = (p: number) => lowerTail(p, r1, n1, n2, s);
  // The smallest stage-2 outcome still ranks above every stage-1 stop, so the lower limit is above 0.
  const ciLow = solveInP(upper, tail, true);
  const ciHigh = s === total ? 1 : solveInP(lower, tail, false);
  return {
    pValue,
    ci: [ciLow, ciHigh],
    umvue: umvueAfterStageTwo(r1, n1, n2, s),
    naiveEstimate: s / total,
    naiveCi: proportionInterval(s, total, { confLevel }),
  };
}
