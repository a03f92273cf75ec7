/**
 * Continuous toxicity stopping boundary of Pocock type (Ivanova, Qaqish & Schell 2005, Biometrics
 * 61:540–545). After each of the first n assessable patients, the toxicities so far, Y_k, are
 * compared with b_k, the smallest b whose tail P(Y_k ≥ b | θ) is at most one constant nominal level
 * c; the cohort stops when Y_k reaches b_k. c is the largest level whose exact probability of ever
 * stopping when the true rate is the acceptable θ stays at or below α.
 *
 * Exactly, not by bisection on a real number: the boundary changes only where c passes one of the
 * tails P(Y_k ≥ b | θ), 1 ≤ b ≤ k ≤ n, and the probability of ever stopping only grows with c (each
 * b_k can only fall). So those tails are sorted and bisected, each step running the forward recursion
 * over k on the distribution of Y_k among the paths not yet stopped. The nominal level reported is
 * that tail, which is also the largest P(Y_k ≥ b_k | θ) of the boundary; every c from it up to (not
 * including) the next tail gives the same boundary.
 */
import { StatsInputError, requireCount, requireOpenUnit } from './errors.js';
import { BinomialRows } from './binomial-table.js';

export interface ToxicityBoundarySettings {
  n: number;
  theta: number;
  alpha: number;
}

export interface ToxicityBoundary {
  /** b_1 … b_n: stop once the toxicities among the first k assessable patients reach b_k; null while no stop is possible. */
  bounds: Array<number | null>;
  nominalLevel: number;
  crossingProbability: number;
}

export interface ToxicityOperatingPoint {
  p: number;
  probStop: number;
  /** Stopping at patient k treats k patients; not stopping treats n. */
  expectedTreated: number;
  /** Toxicities among the patients treated. */
  expectedToxicities: number;
}

/**
 * Largest n accepted. Phase II cohorts are far smaller; at 500 the search sorts 125,250 candidate
 * levels and runs about 17 recursions of n² / 2 steps, a few tens of milliseconds.
 */
export const TOXICITY_BOUNDARY_NMAX = 500;

/** The boundary as the recursion reads it: b_k at index k − 1, k + 1 where no stop is possible. */
type Cutoffs = Int32Array;

interface Run {
  probStop: number;
  expectedTreated: number;
  expectedToxicities: number;
}

/** Follows every path of n patients at toxicity rate p, removing the paths the boundary stops. */
function runBoundary(cutoffs: Cutoffs, p: number): Run {
  const n = cutoffs.length;
  const q = 1 - p;
  // alive[y]: probability of y toxicities so far on a path not yet stopped.
  const alive = new Float64Array(n + 2);
  alive[0] = 1;
  let top = 0;
  let probStop = 0;
  let treated = 0;
  let toxicities = 0;
  for (let k = 1; k <= n; k++) {
    alive[top + 1] = alive[top] * p;
    for (let y = top; y >= 1; y--) alive[y] = alive[y] * q + alive[y - 1] * p;
    alive[0] *= q;
    top++;
    const b = cutoffs[k - 1];
    for (let y = b; y <= top; y++) {
      probStop += alive[y];
      treated += k * alive[y];
      toxicities += y * alive[y];
      alive[y] = 0;
    }
    top = Math.min(top, b - 1);
  }
  for (let y = 0; y <= top; y++) {
    treated += n * alive[y];
    toxicities += y * alive[y];
  }
  return { probStop, expectedTreated: treated, expectedToxicities: toxicities };
}

/** b_k for every k at nominal level c: the smallest b ≥ 1 with P(Y_k ≥ b) ≤ c (k + 1 when none). */
function cutoffsAt(rows: BinomialRows, n: number, c: number): Cutoffs {
  const cutoffs = new Int32Array(n);
  for (let k = 1; k <= n; k++) {
    // P(Y_k ≥ b) = sf(k, b − 1) falls as b rises: bisect on b in [1, k + 1].
    let lo = 1;
    let hi = k + 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (rows.sf(k, mid - 1) <= c) hi = mid;
      else lo = mid + 1;
    }
    cutoffs[k - 1] = lo;
  }
  return cutoffs;
}

function validateSettings(settings: ToxicityBoundarySettings): void {
  if (typeof settings !== 'object' || settings === null) {
    throw new StatsInputError('n', 'Boundary settings n, theta and alpha are required.');
  }
  const n = requireCount('n', settings.n, 1);
  if (n > TOXICITY_BOUNDARY_NMAX) {
    throw new StatsInputError('n', `n (${n}) is above ${TOXICITY_BOUNDARY_NMAX}, the largest toxicity boundary offered.`);
  }
  requireOpenUnit('theta', settings.theta);
  requireOpenUnit('alpha', settings.alpha);
}

export function toxicityBoundary(settings: ToxicityBoundarySettings): ToxicityBoundary {
  validateSettings(settings);
  const { n, theta, alpha } = settings;
  const rows = new BinomialRows(n, theta);
  const levels: number[] = [];
  for (let k = 1; k <= n; k++) {
    for (let b = 1; b <= k; b++) {
      const tail = rows.sf(k, b - 1);
      // A tail that underflows to 0 is no level at which the boundary could change.
      if (tail > 0) levels.push(tail);
    }
  }
  const sorted = Float64Array.from(levels).sort();
  const crossingAt = (i: number) => runBoundary(cutoffsAt(rows, n, sorted[i]), theta).probStop;
  // Invariant: level lo keeps the crossing probability ≤ α (lo = −1 stands for c = 0, which never
  // stops), level hi does not (hi = length stands for c = 1).
  let lo = -1;
  let hi = sorted.length;
  while (hi - lo > 1) {
    const mid = (lo + hi) >>> 1;
    if (crossingAt(mid) <= alpha) lo = mid;
    else hi = mid;
  }
  if (lo < 0) {
    const least = crossingAt(0);
    throw new StatsInputError(
      'alpha',
      `No boundary over ${n} patients keeps the chance of stopping at θ = ${theta} within alpha = ${alpha}: ` +
        `the boundary that stops least already stops with probability ${least.toPrecision(3)}. Raise alpha or n.`,
    );
  }
  const nominalLevel = sorted[lo];
  const cutoffs = cutoffsAt(rows, n, nominalLevel);
  return {
    bounds: Array.from(cutoffs, (b, i) => (b <= i + 1 ? b : null)),
    nominalLevel,
    crossingProbability: runBoundary(cutoffs, theta).probStop,
  };
}

function validateBounds(bounds: unknown): Cutoffs {
  if (!Array.isArray(bounds) || bounds.length === 0 || bounds.length > TOXICITY_BOUNDARY_NMAX) {
    throw new StatsInputError('bounds', `bounds must be a list of 1 to ${TOXICITY_BOUNDARY_NMAX} cut-offs (b_1 … b_n).`);
  }
  return Int32Array.from(bounds, (b: unknown, i) => {
    const k = i + 1;
    if (b === null) return k + 1;
    if (typeof b !== 'number' || !Number.isInteger(b) || b < 1 || b > k) {
      throw new StatsInputError('bounds', `bounds[${i}] must be null or a whole number from 1 to ${k} (got ${JSON.stringify(b)}).`);
    }
    return b;
  });
}

/** Probability of stopping, expected patients treated and expected toxicities among them, at each true rate in ps. */
export function toxicityBoundaryCharacteristics(bounds: Array<number | null>, ps: number[]): ToxicityOperatingPoint[] {
  const cutoffs = validateBounds(bounds);
  if (!Array.isArray(ps)) throw new StatsInputError('ps', 'ps must be a list of toxicity rates.');
  return ps.map((p, i) => {
    if (typeof p !== 'number' || !(p >= 0 && p <= 1)) {
      throw new StatsInputError('ps', `ps[${i}] must be a toxicity rate between 0 and 1 (got ${String(p)}).`);
    }
    return { p, ...runBoundary(cutoffs, p) };
  });
}
