/**
 * Exact binomial test and intervals for one proportion: Clopper & Pearson (1934) test and interval,
 * the minimum-likelihood two-sided p-value, Wilson (1927) and Jeffreys (Brown, Cai & DasGupta 2001)
 * intervals. Tails come from the incomplete beta, never from summing terms, so n = 10^7 costs the
 * same as n = 10.
 */
import { StatsInputError, requireAtMost, requireCount, requireOpenUnit } from './errors.js';
import { betaQuantile, betaTails, binomialLogPmf, normalQuantile } from './special.js';

export type Alternative = 'greater' | 'less' | 'two-sided';
export type IntervalMethod = 'clopper-pearson' | 'wilson' | 'jeffreys';

export interface BinomialTestResult {
  x: number;
  n: number;
  p0: number;
  estimate: number;
  pValue: number;
  ci: [number, number];
  alternative: Alternative;
  confLevel: number;
}

/** Outcomes whose probability is within this relative margin of the observed one count as "as extreme". */
const RELATIVE_TOLERANCE = 1 + 1e-7;
const ALTERNATIVES: readonly Alternative[] = ['greater', 'less', 'two-sided'];
const METHODS: readonly IntervalMethod[] = ['clopper-pearson', 'wilson', 'jeffreys'];

/** P(X ≤ k) for X ~ Binomial(n, p). */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  return betaTails(p, k + 1, n - k)[1];
}

/** P(X > k) for X ~ Binomial(n, p), accurate however small. */
export function binomialSf(k: number, n: number, p: number): number {
  if (k < 0) return 1;
  if (k >= n) return 0;
  return betaTails(p, k + 1, n - k)[0];
}

export function validateCounts(x: unknown, n: unknown, xField = 'x', nField = 'n'): void {
  requireCount(nField, n, 1);
  requireCount(xField, x);
  requireAtMost(xField, x as number, nField, n as number);
}

function validateConfLevel(confLevel: unknown): number {
  return requireOpenUnit('confLevel', confLevel);
}

/** Clopper–Pearson limit below x/n with tail probability `tail` (0 when x = 0). */
function exactLower(x: number, n: number, tail: number): number {
  return x === 0 ? 0 : betaQuantile(tail, x, n - x + 1);
}

/** Clopper–Pearson limit above x/n with tail probability `tail` (1 when x = n). */
function exactUpper(x: number, n: number, tail: number): number {
  return x === n ? 1 : betaQuantile(tail, x + 1, n - x, true);
}

/**
 * Two-sided p-value by the minimum-likelihood method: the probability of every outcome no more likely
 * than the observed one. The pmf falls monotonically away from n·p0, so the edge of the opposite tail
 * is found by bisection and that tail is one incomplete beta.
 */
function twoSidedPValue(x: number, n: number, p0: number): number {
  const mean = n * p0;
  if (x === mean) return 1;
  const limit = binomialLogPmf(x, n, p0) + Math.log(RELATIVE_TOLERANCE);
  if (x < mean) {
    // Smallest k ≥ ⌈mean⌉ whose pmf is at most the observed one; every k above it qualifies too.
    let lo = Math.ceil(mean);
    let hi = n + 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (binomialLogPmf(mid, n, p0) <= limit) hi = mid;
      else lo = mid + 1;
    }
    return Math.min(1, binomialCdf(x, n, p0) + binomialSf(lo - 1, n, p0));
  }
  // Largest k ≤ ⌊mean⌋ whose pmf is at most the observed one; every k below it qualifies too.
  let lo = -1;
  let hi = Math.floor(mean);
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (binomialLogPmf(mid, n, p0) <= limit) lo = mid;
    else hi = mid - 1;
  }
  return Math.min(1, binomialCdf(lo, n, p0) + binomialSf(x - 1, n, p0));
}

export function binomialTest(
  x: number,
  n: number,
  p0: number,
  opts: { alternative?: Alternative; confLevel?: number } = {},
): BinomialTestResult {
  validateCounts(x, n);
  requireOpenUnit('p0', p0);
  const alternative = opts.alternative ?? 'two-sided';
  if (!ALTERNATIVES.includes(alternative)) {
    throw new StatsInputError('alternative', `alternative must be one of ${ALTERNATIVES.join(', ')} (got ${String(alternative)}).`);
  }
  const confLevel = validateConfLevel(opts.confLevel ?? 0.95);
  const tail = 1 - confLevel;
  let pValue: number;
  let ci: [number, number];
  if (alternative === 'greater') {
    pValue = binomialSf(x - 1, n, p0);
    ci = [exactLower(x, n, tail), 1];
  } else if (alternative === 'less') {
    pValue = binomialCdf(x, n, p0);
    ci = [0, exactUpper(x, n, tail)];
  } else {
    pValue = twoSidedPValue(x, n, p0);
    ci = [exactLower(x, n, tail / 2), exactUpper(x, n, tail / 2)];
  }
  return { x, n, p0, estimate: x / n, pValue, ci, alternative, confLevel };
}

/** Two-sided interval for x/n: Clopper–Pearson (exact), Wilson score, or Jeffreys (equal-tailed Beta(½, ½) posterior). */
export function proportionInterval(
  x: number,
  n: number,
  opts: { method?: IntervalMethod; confLevel?: number } = {},
): [number, number] {
  validateCounts(x, n);
  const method = opts.method ?? 'clopper-pearson';
  if (!METHODS.includes(method)) {
    throw new StatsInputError('method', `method must be one of ${METHODS.join(', ')} (got ${String(method)}).`);
  }
  const tail = (1 - validateConfLevel(opts.confLevel ?? 0.95)) / 2;
  if (method === 'clopper-pearson') return [exactLower(x, n, tail), exactUpper(x, n, tail)];
  if (method === 'jeffreys') {
    // Brown, Cai & DasGupta set the limit to 0 at x = 0 and to 1 at x = n.
    return [
      x === 0 ? 0 : betaQuantile(tail, x + 0.5, n - x + 0.5),
      x === n ? 1 : betaQuantile(tail, x + 0.5, n - x + 0.5, true),
    ];
  }
  const z = normalQuantile(1 - tail);
  const z2 = z * z;
  const centre = (x + z2 / 2) / (n + z2);
  const half = (z * Math.sqrt((x * (n - x)) / n + z2 / 4)) / (n + z2);
  // At x = 0 or x = n the limit is exactly 0 or 1; rounding must not move it.
  return [x === 0 ? 0 : centre - half, x === n ? 1 : centre + half];
}
