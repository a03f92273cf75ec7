/**
 * Posterior and predictive probabilities for monitoring (Lee & Liu 2008, Clinical Trials 5:93–106).
 */
import { describe, expect, it } from 'vitest';
import { StatsInputError, posteriorProbability, predictiveProbability } from '../../server/stats';
import { binomLower, logFactorial } from './reference';

/** With a uniform prior, P(p > p0 | x of n) = P(Bin(n + 1, p0) ≤ x) (common practice: beta–binomial duality). */
function uniformPosterior(x: number, n: number, p0: number): number {
  return binomLower(x, n + 1, p0);
}

/** ln B(a, b) for whole a, b. */
function logBetaInt(a: number, b: number): number {
  return logFactorial(a - 1) + logFactorial(b - 1) - logFactorial(a + b - 1);
}

describe('posteriorProbability', () => {
  it('when the prior is uniform, then P(p > p0 | data) equals the binomial tail of the duality', () => {
    for (const [x, n, p0] of [[0, 10, 0.1], [5, 20, 0.2], [14, 40, 0.3], [40, 40, 0.9], [300, 1000, 0.28]]) {
      // The summed log-factorial reference itself carries ~1e-12 error at n = 1000.
      expect(posteriorProbability({ x, n, p0, prior: { a: 1, b: 1 } })).toBeCloseTo(uniformPosterior(x, n, p0), 10);
    }
  });

  it('when the prior is not uniform, then the result matches Simpson integration of the beta density (common practice)', () => {
    const [a, b, p0] = [0.6 + 5, 1.4 + 15, 0.2];
    const logB = logBetaInt(1, 1);
    const density = (p: number) => Math.exp((a - 1) * Math.log(p) + (b - 1) * Math.log1p(-p) - logB);
    const steps = 20_000;
    const h = (1 - p0) / steps;
    let sum = density(p0) + density(1 - 1e-15);
    for (let i = 1; i < steps; i++) sum += (i % 2 ? 4 : 2) * density(p0 + i * h);
    let norm = 0;
    const h0 = 1 / steps;
    for (let i = 1; i < steps; i++) norm += (i % 2 ? 4 : 2) * density(i * h0);
    expect(posteriorProbability({ x: 5, n: 20, p0, prior: { a: 0.6, b: 1.4 } })).toBeCloseTo(sum * h / (norm * h0), 6);
  });
});

describe('predictiveProbability (Lee & Liu 2008)', () => {
  it('when summed over the beta-binomial outcomes by brute force, then the predictive probability agrees', () => {
    for (const [x, n, nmax, p0, thetaT] of [[5, 20, 40, 0.2, 0.9], [2, 15, 30, 0.2, 0.95], [10, 25, 60, 0.3, 0.85], [0, 5, 20, 0.1, 0.9]]) {
      const m = nmax - n;
      let expected = 0;
      for (let y = 0; y <= m; y++) {
        const logPmf =
          logFactorial(m) - logFactorial(y) - logFactorial(m - y) + logBetaInt(x + 1 + y, n - x + 1 + m - y) - logBetaInt(x + 1, n - x + 1);
        if (uniformPosterior(x + y, nmax, p0) > thetaT) expected += Math.exp(logPmf);
      }
      expect(predictiveProbability({ x, n, nmax, p0, thetaT, prior: { a: 1, b: 1 } })).toBeCloseTo(expected, 12);
    }
  });

  it('when no patients remain, then the predictive probability is 1 or 0 by the current posterior', () => {
    const input = { x: 9, n: 20, nmax: 20, p0: 0.2, prior: { a: 1, b: 1 } };
    const posterior = posteriorProbability(input);
    expect(predictiveProbability({ ...input, thetaT: posterior - 0.01 })).toBe(1);
    expect(predictiveProbability({ ...input, thetaT: posterior + 0.001 })).toBe(0);
  });

  it.each([
    ['nmax', { x: 5, n: 20, nmax: 10, p0: 0.2, thetaT: 0.9, prior: { a: 1, b: 1 } }],
    ['thetaT', { x: 5, n: 20, nmax: 40, p0: 0.2, thetaT: 1, prior: { a: 1, b: 1 } }],
    ['a', { x: 5, n: 20, nmax: 40, p0: 0.2, thetaT: 0.9, prior: { a: 0, b: 1 } }],
    ['x', { x: 25, n: 20, nmax: 40, p0: 0.2, thetaT: 0.9, prior: { a: 1, b: 1 } }],
  ])('when %s is invalid, then the error names it', (field, input) => {
    try {
      predictiveProbability(input);
      expect.unreachable('expected a StatsInputError');
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      expect((error as StatsInputError).field).toBe(field);
    }
  });
});
