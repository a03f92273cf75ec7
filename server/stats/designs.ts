/**
 * Designs for a single-arm trial with a binary endpoint, testing H0: p ≤ p0 against p ≥ p1.
 *
 * - Single stage, exact (A'Hern 2001): the smallest n with a cut-off r such that
 *   P(X > r | p0) ≤ α and P(X > r | p1) ≥ 1 − β.
 * - Two stage (Simon 1989): stop for futility after n1 patients when responders ≤ r1, otherwise
 *   enrol to n and call the treatment promising when responders > r. The search covers
 *   n1 in [1, n − 1], r1 in [0, n1), r in [r1, n) for every n up to nmax, exactly.
 * - Admissible designs (Jung, Lee, Kim & George 2004): the designs minimising q·n + (1 − q)·EN0 for
 *   some q in [0, 1]; q = 0 gives the optimal design, q = 1 the minimax design.
 *
 * Speed: binomial pmf and tail tables are built once per n; for each (n, n1), r1 walks down from
 * the largest value power allows and the smallest admissible cut-off r only moves up (a smaller r1
 * raises the type I error of every r), so each r1 costs a few partial sums instead of a fresh search
 * over r. Designs that cannot beat the EN0 of a smaller n are never examined.
 */
import { StatsInputError, requireCount, requireOpenUnit } from './errors.js';
import { binomialLogPmf } from './special.js';
import { binomialCdf, binomialSf } from './binomial.js';

export interface DesignSettings {
  p0: number;
  p1: number;
  alpha: number;
  beta: number;
  nmax?: number;
}

export interface SingleStageDesign {
  n: number;
  r: number;
  typeIError: number;
  power: number;
}

export interface TwoStageDesign {
  r1: number;
  n1: number;
  r: number;
  n: number;
  pet0: number;
  en0: number;
  typeIError: number;
  power: number;
}

export type AdmissibleDesign = TwoStageDesign & { qFrom: number; qTo: number };

export interface SimonDesigns {
  optimal: TwoStageDesign;
  minimax: TwoStageDesign;
  admissible: AdmissibleDesign[];
}

/** A design as the interim and planning functions take it; single-stage when r1 and n1 are absent. */
export interface DesignRule {
  r1?: number;
  n1?: number;
  r: number;
  n: number;
}

export interface OperatingPoint {
  p: number;
  probPromising: number;
  pet: number;
  expectedN: number;
}

/** Upper end of the single-stage search when the caller sets no nmax. */
const SINGLE_STAGE_SEARCH_LIMIT = 100_000;
/** Largest two-stage search accepted: the exhaustive search grows as nmax⁴. */
const TWO_STAGE_NMAX_LIMIT = 500;
/** Crossings of the q lines closer than this are one crossing (EN0 carries rounding error). */
const Q_TOLERANCE = 1e-12;

function validateSettings(settings: DesignSettings): void {
  if (typeof settings !== 'object' || settings === null) {
    throw new StatsInputError('p0', 'Design settings p0, p1, alpha and beta are required.');
  }
  const p0 = requireOpenUnit('p0', settings.p0);
  const p1 = requireOpenUnit('p1', settings.p1);
  const alpha = requireOpenUnit('alpha', settings.alpha);
  const beta = requireOpenUnit('beta', settings.beta);
  if (p1 <= p0) {
    throw new StatsInputError('p1', `p1 (${p1}) must be greater than p0 (${p0}): the design tests for an improvement.`);
  }
  if (alpha + beta >= 1) {
    throw new StatsInputError('beta', `alpha + beta must be less than 1 (got ${alpha} + ${beta}); otherwise no trial is needed.`);
  }
  if (settings.nmax !== undefined) requireCount('nmax', settings.nmax, 1);
}

/** Smallest r with P(X > r | p0) ≤ α for n patients, found from a normal start by stepping. */
export function singleStageCutoff(n: number, p0: number, alpha: number): number {
  const guess = Math.round(n * p0 + 1.6 * Math.sqrt(n * p0 * (1 - p0)));
  let r = Math.min(Math.max(guess, 0), n);
  while (r > 0 && binomialSf(r - 1, n, p0) <= alpha) r--;
  while (binomialSf(r, n, p0) > alpha) r++;
  return r;
}

function singleStageAt(n: number, p0: number, p1: number, alpha: number): SingleStageDesign {
  const r = singleStageCutoff(n, p0, alpha);
  return { n, r, typeIError: binomialSf(r, n, p0), power: binomialSf(r, n, p1) };
}

function findSingleStage(p0: number, p1: number, alpha: number, beta: number, limit: number): SingleStageDesign | null {
  for (let n = 1; n <= limit; n++) {
    const design = singleStageAt(n, p0, p1, alpha);
    if (design.power >= 1 - beta) return design;
  }
  return null;
}

function tooSmall(nmax: number, alpha: number, beta: number, needed: number | null, kind: string): StatsInputError {
  const head = `No ${kind} design with at most ${nmax} patients reaches power ${1 - beta} at alpha ${alpha}`;
  return new StatsInputError(
    'nmax',
    needed === null ? `${head}; nmax is too small.` : `${head}; the smallest maximum size that does is ${needed}.`,
  );
}

export function singleStageDesign(settings: DesignSettings): SingleStageDesign {
  validateSettings(settings);
  const { p0, p1, alpha, beta } = settings;
  const limit = settings.nmax ?? SINGLE_STAGE_SEARCH_LIMIT;
  const design = findSingleStage(p0, p1, alpha, beta, limit);
  if (design) return design;
  const beyond = settings.nmax === undefined ? null : findSingleStage(p0, p1, alpha, beta, SINGLE_STAGE_SEARCH_LIMIT);
  throw tooSmall(limit, alpha, beta, beyond?.n ?? null, 'single-stage');
}

/** Per-n binomial pmf and upper tails P(X > k) under one response rate, rows padded to nmax + 1. */
class BinomialTable {
  readonly width: number;
  readonly pmf: Float64Array;
  readonly sf: Float64Array;

  constructor(nmax: number, p: number) {
    const width = nmax + 1;
    this.width = width;
    this.pmf = new Float64Array(width * width);
    this.sf = new Float64Array(width * width);
    for (let m = 0; m <= nmax; m++) {
      const row = m * width;
      for (let k = 0; k <= m; k++) this.pmf[row + k] = Math.exp(binomialLogPmf(k, m, p));
      // Summed from the top so that small tails keep their precision.
      let tail = 0;
      for (let k = m; k >= 0; k--) {
        this.sf[row + k] = tail;
        tail += this.pmf[row + k];
      }
    }
  }
}

/**
 * P(X1 > r1 and X1 + X2 > r) with X1 ~ Bin(n1, p), X2 ~ Bin(n2, p), for r ≥ r1: the chance that the
 * design reaches a promising result. Terms with x1 > r need no stage-2 tail and sum to P(X1 > r).
 */
function promisingProbability(t: BinomialTable, n1: number, n2: number, r1: number, r: number): number {
  const w = t.width;
  const b1 = n1 * w;
  const s2 = n2 * w;
  let total = r < n1 ? t.sf[b1 + r] : 0;
  const from = Math.max(r1 + 1, r - n2 + 1);
  const to = Math.min(r, n1);
  for (let x1 = from; x1 <= to; x1++) total += t.pmf[b1 + x1] * t.sf[s2 + r - x1];
  return total;
}

interface Candidate {
  n: number;
  n1: number;
  r1: number;
  r: number;
  en0: number;
}

/**
 * The feasible designs that no other design beats on both n and EN0: for each total size n, the one
 * with the least EN0 (ties: the smaller n1), kept only if its EN0 is below that of every smaller n.
 * Optimal, minimax and admissible designs are all among these, in increasing n.
 */
function undominatedDesigns(p0: number, p1: number, alpha: number, beta: number, nmax: number): Candidate[] {
  const t0 = new BinomialTable(nmax, p0);
  const t1 = new BinomialTable(nmax, p1);
  const w = t0.width;
  const power = 1 - beta;
  const found: Candidate[] = [];
  let bestSmaller = Infinity;
  for (let n = 2; n <= nmax; n++) {
    let bestHere: Candidate | null = null;
    for (let n1 = 1; n1 < n; n1++) {
      const n2 = n - n1;
      const row1 = n1 * w;
      const bound = Math.min(bestSmaller, bestHere?.en0 ?? Infinity);
      // Power cannot exceed P(X1 > r1 | p1), which falls as r1 rises: that caps r1.
      let r1 = -1;
      while (r1 + 1 < n1 && t1.sf[row1 + r1 + 1] >= power) r1++;
      // EN0 = n1 + P(X1 > r1 | p0)·n2 rises as r1 falls, so walk r1 down from the cap and stop at the
      // first feasible r1 or once EN0 can no longer beat the bound.
      let r = r1;
      for (; r1 >= 0 && n1 + t0.sf[row1 + r1] * n2 < bound; r1--) {
        // The smallest r meeting α only grows as r1 falls.
        if (r < r1) r = r1;
        while (promisingProbability(t0, n1, n2, r1, r) > alpha) r++;
        if (promisingProbability(t1, n1, n2, r1, r) >= power) {
          bestHere = { n, n1, r1, r, en0: n1 + t0.sf[row1 + r1] * n2 };
          break;
        }
      }
    }
    if (bestHere !== null) {
      found.push(bestHere);
      bestSmaller = bestHere.en0;
    }
  }
  return found;
}

function describe(c: Candidate, p0: number, p1: number): TwoStageDesign {
  const n2 = c.n - c.n1;
  const pet0 = binomialCdf(c.r1, c.n1, p0);
  return {
    r1: c.r1,
    n1: c.n1,
    r: c.r,
    n: c.n,
    pet0,
    en0: c.n1 + (1 - pet0) * n2,
    typeIError: promisingExact(c.n1, n2, c.r1, c.r, p0),
    power: promisingExact(c.n1, n2, c.r1, c.r, p1),
  };
}

/** P(promising) for any design and rate, straight from the binomial functions (no table needed). */
function promisingExact(n1: number, n2: number, r1: number, r: number, p: number): number {
  let total = binomialSf(Math.max(r, r1), n1, p);
  for (let x1 = Math.max(r1 + 1, r - n2 + 1); x1 <= Math.min(r, n1); x1++) {
    total += Math.exp(binomialLogPmf(x1, n1, p)) * binomialSf(r - x1, n2, p);
  }
  return total;
}

/**
 * Lower envelope of the lines q ↦ q·n + (1 − q)·EN0 over q in [0, 1], walked from q = 0 upward.
 * Each step moves to the line that crosses the current one first; among lines crossing at the same q
 * the one with the smallest slope wins, since it stays lowest beyond the crossing.
 */
function admissibleDesigns(candidates: Candidate[]): Array<Candidate & { qFrom: number; qTo: number }> {
  const slope = (c: Candidate) => c.n - c.en0;
  let current = candidates.reduce((a, b) => (b.en0 < a.en0 || (b.en0 === a.en0 && b.n < a.n) ? b : a));
  let q = 0;
  const result: Array<Candidate & { qFrom: number; qTo: number }> = [];
  for (;;) {
    let next: Candidate | null = null;
    let nextQ = Infinity;
    for (const c of candidates) {
      if (slope(c) >= slope(current)) continue;
      const crossing = (c.en0 - current.en0) / (slope(current) - slope(c));
      if (crossing < q - Q_TOLERANCE || crossing > 1 + Q_TOLERANCE) continue;
      const tied = next !== null && Math.abs(crossing - nextQ) <= Q_TOLERANCE;
      if ((crossing < nextQ && !tied) || (tied && slope(c) < slope(next as Candidate))) {
        next = c;
        nextQ = Math.min(1, Math.max(q, crossing));
      }
    }
    if (next === null) {
      result.push({ ...current, qFrom: q, qTo: 1 });
      return result;
    }
    if (nextQ > q) result.push({ ...current, qFrom: q, qTo: nextQ });
    current = next;
    q = nextQ;
  }
}

/** Smallest n above nmax with a feasible two-stage design, searched up to a modest bound; null beyond it. */
function smallestFeasibleSize(p0: number, p1: number, alpha: number, beta: number, nmax: number): number | null {
  const single = findSingleStage(p0, p1, alpha, beta, SINGLE_STAGE_SEARCH_LIMIT);
  const bound = Math.min(TWO_STAGE_NMAX_LIMIT, Math.max(nmax + 1, Math.ceil((single?.n ?? 0) * 1.2)));
  if (bound <= nmax) return null;
  return undominatedDesigns(p0, p1, alpha, beta, bound)[0]?.n ?? null;
}

export function simonDesigns(settings: DesignSettings): SimonDesigns {
  validateSettings(settings);
  const { p0, p1, alpha, beta } = settings;
  let nmax = settings.nmax;
  if (nmax === undefined) {
    // Default search bound: 1.5 times the single-stage size, which holds the optimal design in practice.
    const single = findSingleStage(p0, p1, alpha, beta, SINGLE_STAGE_SEARCH_LIMIT);
    if (single === null) throw tooSmall(SINGLE_STAGE_SEARCH_LIMIT, alpha, beta, null, 'two-stage');
    nmax = Math.min(Math.ceil(1.5 * single.n), TWO_STAGE_NMAX_LIMIT);
  }
  if (nmax > TWO_STAGE_NMAX_LIMIT) {
    throw new StatsInputError('nmax', `nmax (${nmax}) is above ${TWO_STAGE_NMAX_LIMIT}, the largest two-stage search offered.`);
  }
  const candidates = undominatedDesigns(p0, p1, alpha, beta, nmax);
  if (candidates.length === 0) {
    throw tooSmall(nmax, alpha, beta, smallestFeasibleSize(p0, p1, alpha, beta, nmax), 'two-stage');
  }
  const admissible = admissibleDesigns(candidates);
  const optimal = admissible[0];
  const minimax = admissible[admissible.length - 1];
  return {
    optimal: describe(optimal, p0, p1),
    minimax: describe(minimax, p0, p1),
    admissible: admissible.map((c) => ({ ...describe(c, p0, p1), qFrom: c.qFrom, qTo: c.qTo })),
  };
}

export function validateRule(design: DesignRule): { r1: number; n1: number; twoStage: boolean } {
  if (typeof design !== 'object' || design === null) throw new StatsInputError('design', 'A design with r and n is required.');
  const n = requireCount('n', design.n, 1);
  const r = requireCount('r', design.r);
  if (r >= n) throw new StatsInputError('r', `r (${r}) must be less than n (${n}).`);
  if (design.n1 === undefined && design.r1 === undefined) return { r1: -1, n1: 0, twoStage: false };
  if (design.n1 === undefined) throw new StatsInputError('n1', 'n1 is required when r1 is given.');
  if (design.r1 === undefined) throw new StatsInputError('r1', 'r1 is required when n1 is given.');
  const n1 = requireCount('n1', design.n1, 1);
  const r1 = requireCount('r1', design.r1);
  if (n1 >= n) throw new StatsInputError('n1', `n1 (${n1}) must be less than n (${n}).`);
  if (r1 >= n1) throw new StatsInputError('r1', `r1 (${r1}) must be less than n1 (${n1}).`);
  if (r < r1) throw new StatsInputError('r', `r (${r}) must be at least r1 (${r1}).`);
  return { r1, n1, twoStage: true };
}

/** Probability of a promising result, of early termination, and the expected size, at each rate in ps. */
export function operatingCharacteristics(design: DesignRule, ps: number[]): OperatingPoint[] {
  const { r1, n1, twoStage } = validateRule(design);
  if (!Array.isArray(ps)) throw new StatsInputError('ps', 'ps must be a list of response rates.');
  const { r, n } = design;
  return ps.map((p, i) => {
    if (typeof p !== 'number' || !(p >= 0 && p <= 1)) {
      throw new StatsInputError('ps', `ps[${i}] must be a response rate between 0 and 1 (got ${String(p)}).`);
    }
    if (!twoStage) return { p, probPromising: binomialSf(r, n, p), pet: 0, expectedN: n };
    const pet = binomialCdf(r1, n1, p);
    return { p, probPromising: promisingExact(n1, n - n1, r1, r, p), pet, expectedN: n1 + (1 - pet) * (n - n1) };
  });
}
