/**
 * Continuous toxicity stopping boundary (Ivanova, Qaqish & Schell 2005, Biometrics 61:540–545): an
 * open implementation's documented example, exhaustive enumeration of every path for small n, and
 * the defining properties of the nominal level.
 */
import { describe, expect, it } from 'vitest';
import { toxicityBoundary, toxicityBoundaryCharacteristics } from '../../server/stats';
import { binomUpper } from './reference';

type Bounds = Array<number | null>;

/** Every one of the 2^n toxicity paths, weighted by its probability at rate p; the boundary stops it at the first k with Y_k ≥ b_k. */
function enumeratePaths(bounds: Bounds, p: number) {
  const n = bounds.length;
  let probStop = 0;
  let expectedTreated = 0;
  let expectedToxicities = 0;
  for (let path = 0; path < 2 ** n; path++) {
    let probability = 1;
    for (let k = 0; k < n; k++) probability *= (path >> k) & 1 ? p : 1 - p;
    let toxicities = 0;
    let treated = n;
    let stopped = false;
    for (let k = 1; k <= n; k++) {
      toxicities += (path >> (k - 1)) & 1;
      const b = bounds[k - 1];
      if (b !== null && toxicities >= b) {
        treated = k;
        stopped = true;
        break;
      }
    }
    if (stopped) probStop += probability;
    expectedTreated += probability * treated;
    expectedToxicities += probability * toxicities;
  }
  return { probStop, expectedTreated, expectedToxicities };
}

/** P(Y_k ≥ b | θ), summed term by term. */
const tail = (k: number, b: number, theta: number) => binomUpper(b - 1, k, theta);

/** The boundary at nominal level c, straight from its definition (a relative slack absorbs rounding at c itself). */
function boundsAt(n: number, theta: number, c: number): Bounds {
  return Array.from({ length: n }, (_, i) => {
    const k = i + 1;
    for (let b = 1; b <= k; b++) if (tail(k, b, theta) <= c * (1 + 1e-10)) return b;
    return null;
  });
}

/** The smallest tail P(Y_k ≥ b | θ), 1 ≤ b ≤ k ≤ n, clearly above c: the next level at which the boundary changes. */
function nextLevel(n: number, theta: number, c: number): number {
  let next = Infinity;
  for (let k = 1; k <= n; k++) {
    for (let b = 1; b <= k; b++) {
      const value = tail(k, b, theta);
      if (value > c * (1 + 1e-9) && value < next) next = value;
    }
  }
  return next;
}

describe('toxicityBoundary against the documented example of the open R package stoppingrule (github.com/mjmartens/stoppingrule, README)', () => {
  // An earlier README version: calc.rule.bin(ns = 1:30, p0 = 0.20, alpha = 0.10, type = "Pocock"), its
  // "Pocock-type test proposed by Ivanova et al. 2005", printed boundary, calibrated constant 0.03766345
  // and OC.rule.bin at p = 0.20 … 0.40 ("Reject Prob", "E(evalauted)").
  const published = [2, 3, 3, 3, 4, 4, 4, 5, 5, 5, 6, 6, 6, 7, 7, 7, 8, 8, 8, 8, 9, 9, 9, 9, 10, 10, 10, 11, 11, 11];
  const rates = [0.2, 0.25, 0.3, 0.35, 0.4];
  const rejectProb = [0.09915263, 0.23312769, 0.42603085, 0.63398556, 0.80576733];
  const expectedEvaluated = [28.16703, 26.04001, 22.98251, 19.37012, 15.75017];

  it('when n 30, θ 0.20, α 0.10, then the boundary is the printed one (no stop possible before 3 patients)', () => {
    const { bounds } = toxicityBoundary({ n: 30, theta: 0.2, alpha: 0.1 });
    expect(bounds).toEqual(published.map((b, i) => (b <= i + 1 ? b : null)));
  });

  it('when n 30, θ 0.20, α 0.10, then its crossing probability, probabilities of stopping and expected patients treated are the printed ones', () => {
    const { bounds, crossingProbability } = toxicityBoundary({ n: 30, theta: 0.2, alpha: 0.1 });
    expect(crossingProbability).toBeCloseTo(0.09915263, 8);
    toxicityBoundaryCharacteristics(bounds, rates).forEach((point, i) => {
      expect(point.probStop).toBeCloseTo(rejectProb[i], 8);
      expect(point.expectedTreated).toBeCloseTo(expectedEvaluated[i], 5);
    });
  });

  it("when n 30, θ 0.20, α 0.10, then the package's calibrated constant 0.03766345 is the level where our boundary would next change", () => {
    // The package bisects on a real constant and keeps the largest one still within α, so it lands on
    // the supremum of the levels giving this boundary: our next level, P(Y_17 ≥ 7 | 0.2) = 0.0376634429…
    // It finds each cut-off with a root finder, which blurs the last printed digit.
    const { nominalLevel } = toxicityBoundary({ n: 30, theta: 0.2, alpha: 0.1 });
    expect(nominalLevel).toBeLessThan(0.03766345);
    expect(Math.abs(nextLevel(30, 0.2, nominalLevel) - 0.03766345)).toBeLessThan(1e-8);
  });

  it('when a rule is evaluated, then the expected toxicities among treated patients match the README at commit 09f9988 (its beta-binomial example rule)', () => {
    // That README version prints calc.rule.bin(ns = 1:30, p0 = 0.20, alpha = 0.10, type = "BB", param = c(0.6, 2.4))
    // and OC.rule.bin at p = 0.20 … 0.40 ("Reject Prob", "E(events)"). The earlier version's E(events)
    // column exceeds p · E(evaluated) by exactly 2p², which no stopping time allows (Wald's identity), so
    // it is not used.
    const rule = [2, 3, 3, 3, 4, 4, 5, 5, 5, 5, 6, 6, 6, 7, 7, 7, 7, 8, 8, 8, 9, 9, 9, 9, 10, 10, 10, 10, 11, 11];
    const events = [5.651197, 6.536293, 6.926712, 6.819377, 6.355803];
    const reject = [0.09957367, 0.23832301, 0.43615256, 0.64555222, 0.81491087];
    const bounds = rule.map((b, i) => (b <= i + 1 ? b : null));
    toxicityBoundaryCharacteristics(bounds, rates).forEach((point, i) => {
      expect(point.probStop).toBeCloseTo(reject[i], 8);
      expect(point.expectedToxicities).toBeCloseTo(events[i], 5);
    });
  });
});

describe('toxicityBoundary against exhaustive enumeration of every toxicity path', () => {
  it.each([
    [10, 0.2, 0.1],
    [12, 0.3, 0.05],
    [14, 0.1, 0.2],
    [8, 0.5, 0.3],
    [14, 0.25, 0.1],
    [13, 0.15, 0.05],
  ])('when n %i, θ %f, α %f, then the crossing probability is the sum over all 2^n paths and stays within α', (n, theta, alpha) => {
    const { bounds, crossingProbability } = toxicityBoundary({ n, theta, alpha });
    expect(Math.abs(crossingProbability - enumeratePaths(bounds, theta).probStop)).toBeLessThan(1e-12);
    expect(crossingProbability).toBeLessThanOrEqual(alpha);
  });

  it.each([
    [10, 0.2, 0.1],
    [12, 0.3, 0.05],
    [14, 0.1, 0.2],
    [8, 0.5, 0.3],
  ])('when n %i, θ %f, α %f, then the next larger candidate level gives a boundary crossed with probability above α', (n, theta, alpha) => {
    const { nominalLevel } = toxicityBoundary({ n, theta, alpha });
    const next = nextLevel(n, theta, nominalLevel);
    expect(next).toBeLessThan(Infinity);
    expect(enumeratePaths(boundsAt(n, theta, next), theta).probStop).toBeGreaterThan(alpha);
  });

  it.each([
    [10, 0.2, 0.1],
    [14, 0.1, 0.2],
    [12, 0.3, 0.05],
  ])('when n %i, θ %f, α %f, then the operating characteristics over a grid of rates equal the enumeration', (n, theta, alpha) => {
    const { bounds } = toxicityBoundary({ n, theta, alpha });
    const ps = [0, 0.05, 0.1, 0.2, 0.3, 0.5, 0.8, 1];
    toxicityBoundaryCharacteristics(bounds, ps).forEach((point, i) => {
      const exact = enumeratePaths(bounds, ps[i]);
      expect(point.p).toBe(ps[i]);
      expect(Math.abs(point.probStop - exact.probStop)).toBeLessThan(1e-12);
      expect(Math.abs(point.expectedTreated - exact.expectedTreated)).toBeLessThan(1e-11);
      expect(Math.abs(point.expectedToxicities - exact.expectedToxicities)).toBeLessThan(1e-11);
    });
  });
});

describe('properties of the boundary over a sweep of settings', () => {
  const settings: Array<[number, number, number]> = [];
  for (const n of [5, 20, 50, 100]) {
    for (const theta of [0.05, 0.2, 0.33, 0.5]) for (const alpha of [0.05, 0.1, 0.2]) settings.push([n, theta, alpha]);
  }

  it.each(settings)('when n %i, θ %f, α %f, then the bounds are the definition at the nominal level, rise by 0 or 1 per patient, and the next level crosses above α', (n, theta, alpha) => {
    const { bounds, nominalLevel, crossingProbability } = toxicityBoundary({ n, theta, alpha });
    expect(crossingProbability).toBeLessThanOrEqual(alpha);
    expect(bounds).toEqual(boundsAt(n, theta, nominalLevel));
    // The nominal level is the largest per-look level the boundary uses.
    const used = bounds.map((b, i) => (b === null ? 0 : tail(i + 1, b, theta)));
    expect(Math.max(...used)).toBeCloseTo(nominalLevel, 14);
    const cutoffs = bounds.map((b, i) => b ?? i + 2);
    cutoffs.slice(1).forEach((b, i) => expect(b - cutoffs[i]).toBeGreaterThanOrEqual(0));
    cutoffs.slice(1).forEach((b, i) => expect(b - cutoffs[i]).toBeLessThanOrEqual(1));
    const next = nextLevel(n, theta, nominalLevel);
    if (next < Infinity) {
      const [atNext] = toxicityBoundaryCharacteristics(boundsAt(n, theta, next), [theta]);
      expect(atNext.probStop).toBeGreaterThan(alpha);
    }
  });

  it('when the characteristics are computed, then expected toxicities equal p times expected patients treated (Wald’s identity)', () => {
    const { bounds } = toxicityBoundary({ n: 60, theta: 0.2, alpha: 0.1 });
    for (const point of toxicityBoundaryCharacteristics(bounds, [0.1, 0.2, 0.35, 0.6])) {
      expect(point.expectedToxicities).toBeCloseTo(point.p * point.expectedTreated, 10);
    }
  });
});

describe('toxicity boundary input validation', () => {
  const inputError = (field: string, message = '') =>
    expect.objectContaining({ name: 'StatsInputError', field, message: expect.stringContaining(message) });

  it.each([
    ['n', () => toxicityBoundary({ n: 0, theta: 0.2, alpha: 0.1 })],
    ['n', () => toxicityBoundary({ n: 12.5, theta: 0.2, alpha: 0.1 })],
    ['theta', () => toxicityBoundary({ n: 20, theta: 1, alpha: 0.1 })],
    ['alpha', () => toxicityBoundary({ n: 20, theta: 0.2, alpha: 0 })],
    ['bounds', () => toxicityBoundaryCharacteristics([2, null], [0.2])],
    ['bounds', () => toxicityBoundaryCharacteristics([null, 0], [0.2])],
    ['bounds', () => toxicityBoundaryCharacteristics([], [0.2])],
    ['ps', () => toxicityBoundaryCharacteristics([1, 2], [1.2])],
  ])('when %s is invalid, then the error names it', (field, call) => {
    expect(call).toThrow(inputError(field));
  });

  it('when n is above 500, then the error names the limit', () => {
    expect(() => toxicityBoundary({ n: 501, theta: 0.2, alpha: 0.1 })).toThrow(inputError('n', 'above 500'));
  });

  it('when even the boundary that stops least crosses with probability above α, then no boundary is offered and alpha is named', () => {
    // Two patients at θ 0.5: stopping only on two toxicities out of two already has probability 0.25.
    expect(() => toxicityBoundary({ n: 2, theta: 0.5, alpha: 0.1 })).toThrow(inputError('alpha', 'already stops with probability 0.250'));
  });
});
