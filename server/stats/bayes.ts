/**
 * Bayesian monitoring with a beta prior on the response rate (Lee & Liu 2008).
 *
 * Posterior probability: P(p > p0 | x of n) under Beta(a + x, b + n − x).
 * Predictive probability: with m = nmax − n patients to come, the future responders Y follow a
 * beta-binomial(m, a + x, b + n − x); the trial succeeds at nmax when the posterior probability then
 * exceeds thetaT. The predictive probability is the chance of such a Y.
 */
import { StatsInputError, requireAtMost, requireCount, requireOpenUnit, requirePositive } from './errors.js';
import { betaTails, lbeta, lchoose } from './special.js';

export interface BetaPrior {
  a: number;
  b: number;
}

export interface PosteriorInput {
  x: number;
  n: number;
  p0: number;
  prior: BetaPrior;
}

export interface PredictiveInput extends PosteriorInput {
  nmax: number;
  thetaT: number;
}

function validatePosterior(input: PosteriorInput): void {
  if (typeof input !== 'object' || input === null) throw new StatsInputError('x', 'x, n, p0 and prior are required.');
  const n = requireCount('n', input.n);
  requireAtMost('x', requireCount('x', input.x), 'n', n);
  requireOpenUnit('p0', input.p0);
  if (typeof input.prior !== 'object' || input.prior === null) {
    throw new StatsInputError('prior', 'prior must give the beta parameters a and b.');
  }
  requirePositive('a', input.prior.a);
  requirePositive('b', input.prior.b);
}

function upperPosterior(x: number, n: number, p0: number, prior: BetaPrior): number {
  return betaTails(p0, prior.a + x, prior.b + n - x)[1];
}

export function posteriorProbability(input: PosteriorInput): number {
  validatePosterior(input);
  return upperPosterior(input.x, input.n, input.p0, input.prior);
}

export function predictiveProbability(input: PredictiveInput): number {
  validatePosterior(input);
  const nmax = requireCount('nmax', input.nmax, 1);
  if (nmax < input.n) throw new StatsInputError('nmax', `nmax (${nmax}) cannot be less than n (${input.n}).`);
  const thetaT = requireOpenUnit('thetaT', input.thetaT);
  const { x, n, p0, prior } = input;
  const m = nmax - n;
  const succeeds = (y: number) => upperPosterior(x + y, nmax, p0, prior) > thetaT;
  // The final posterior rises with Y, so success is Y ≥ some y*: find it by bisection.
  let lo = 0;
  let hi = m + 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (succeeds(mid)) hi = mid;
    else lo = mid + 1;
  }
  const a = prior.a + x;
  const b = prior.b + n - x;
  const base = lbeta(a, b);
  let total = 0;
  for (let y = lo; y <= m; y++) total += Math.exp(lchoose(m, y) + lbeta(a + y, b + m - y) - base);
  return Math.min(1, total);
}
