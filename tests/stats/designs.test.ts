/**
 * Single-stage and two-stage designs: published table values, an independent exhaustive search and
 * the properties every returned design must have.
 */
import { describe, expect, it } from 'vitest';
import {
  StatsInputError,
  operatingCharacteristics,
  simonDesigns,
  singleStageDesign,
  type TwoStageDesign,
} from '../../server/stats';
import { binomLower, binomPmf, binomUpper, promising } from './reference';

interface Feasible {
  r1: number;
  n1: number;
  r: number;
  n: number;
  en0: number;
}

/**
 * Plain exhaustive search over n1 in [1, n − 1], r1 in [0, n1), r in [r1, n), keeping for each
 * (n, n1, r1) the smallest r that meets α if it also meets the power.
 */
function bruteForce(p0: number, p1: number, alpha: number, beta: number, nmax: number): Feasible[] {
  const pmf = (p: number) => Array.from({ length: nmax + 1 }, (_, m) => Array.from({ length: m + 1 }, (_, k) => binomPmf(k, m, p)));
  const upper = (p: number) => Array.from({ length: nmax + 1 }, (_, m) => Array.from({ length: nmax + 2 }, (_, k) => binomUpper(k, m, p)));
  const b0 = pmf(p0);
  const b1 = pmf(p1);
  const u0 = upper(p0);
  const u1 = upper(p1);
  const reject = (b: number[][], u: number[][], r1: number, n1: number, r: number, n: number) => {
    let s = 0;
    for (let x1 = r1 + 1; x1 <= n1; x1++) s += b[n1][x1] * (r - x1 < 0 ? 1 : u[n - n1][r - x1]);
    return s;
  };
  const found: Feasible[] = [];
  for (let n = 2; n <= nmax; n++) {
    for (let n1 = 1; n1 < n; n1++) {
      for (let r1 = 0; r1 < n1; r1++) {
        for (let r = r1; r < n; r++) {
          if (reject(b0, u0, r1, n1, r, n) > alpha) continue;
          if (reject(b1, u1, r1, n1, r, n) >= 1 - beta) found.push({ r1, n1, r, n, en0: n1 + binomUpper(r1, n1, p0) * (n - n1) });
          break;
        }
      }
    }
  }
  return found;
}

function checkProperties(d: TwoStageDesign, p0: number, p1: number, alpha: number, beta: number): void {
  const typeI = promising(d.r1, d.n1, d.r, d.n, p0);
  const power = promising(d.r1, d.n1, d.r, d.n, p1);
  expect(typeI).toBeLessThanOrEqual(alpha + 1e-12);
  expect(power).toBeGreaterThanOrEqual(1 - beta - 1e-12);
  expect(d.typeIError).toBeCloseTo(typeI, 12);
  expect(d.power).toBeCloseTo(power, 12);
  expect(d.pet0).toBeCloseTo(binomLower(d.r1, d.n1, p0), 12);
  expect(d.en0).toBeCloseTo(d.n1 + (1 - d.pet0) * (d.n - d.n1), 10);
  expect(0 <= d.r1 && d.r1 < d.n1 && d.n1 < d.n && d.r1 <= d.r && d.r < d.n).toBe(true);
}

describe('simonDesigns reproduces Simon (1989), Controlled Clinical Trials 10:1–10, Table 1 (values recalled from memory)', () => {
  it('when p0 0.10, p1 0.30, α 0.05, β 0.20, then optimal 1/10, 5/29 (EN0 15.0, PET0 0.74) and minimax 1/15, 5/25 (EN0 19.5, PET0 0.55)', () => {
    const { optimal, minimax } = simonDesigns({ p0: 0.1, p1: 0.3, alpha: 0.05, beta: 0.2 });
    expect([optimal.r1, optimal.n1, optimal.r, optimal.n]).toEqual([1, 10, 5, 29]);
    expect(optimal.en0.toFixed(1)).toBe('15.0');
    expect(optimal.pet0.toFixed(2)).toBe('0.74');
    expect([minimax.r1, minimax.n1, minimax.r, minimax.n]).toEqual([1, 15, 5, 25]);
    expect(minimax.en0.toFixed(1)).toBe('19.5');
    expect(minimax.pet0.toFixed(2)).toBe('0.55');
  });

  it('when p0 0.20, p1 0.40, α 0.05, β 0.20, then optimal 3/13, 12/43 (EN0 20.6, PET0 0.75) and minimax 4/18, 10/33 (EN0 22.3, PET0 0.72)', () => {
    const { optimal, minimax } = simonDesigns({ p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2 });
    expect([optimal.r1, optimal.n1, optimal.r, optimal.n]).toEqual([3, 13, 12, 43]);
    expect(optimal.en0.toFixed(1)).toBe('20.6');
    expect(optimal.pet0.toFixed(2)).toBe('0.75');
    expect([minimax.r1, minimax.n1, minimax.r, minimax.n]).toEqual([4, 18, 10, 33]);
    expect(minimax.en0.toFixed(1)).toBe('22.3');
    expect(minimax.pet0.toFixed(2)).toBe('0.72');
  });
});

describe('simonDesigns against an independent exhaustive search (Simon 1989; admissible: Jung, Lee, Kim & George 2004, Statistics in Medicine 23:561–569)', () => {
  it.each([
    [0.1, 0.3, 0.05, 0.2, 40],
    [0.05, 0.25, 0.1, 0.1, 40],
    [0.3, 0.5, 0.1, 0.2, 45],
    [0.6, 0.8, 0.05, 0.2, 45],
  ])('when p0 %f, p1 %f, α %f, β %f, nmax %i, then optimal, minimax and every admissible design match', (p0, p1, alpha, beta, nmax) => {
    const all = bruteForce(p0, p1, alpha, beta, nmax);
    const result = simonDesigns({ p0, p1, alpha, beta, nmax });
    const bestEn0 = Math.min(...all.map((d) => d.en0));
    const optimal = all.filter((d) => d.en0 <= bestEn0 + 1e-12).sort((a, b) => a.n - b.n)[0];
    expect(result.optimal.en0).toBeCloseTo(optimal.en0, 12);
    expect(result.optimal.n).toBe(optimal.n);
    const smallestN = Math.min(...all.map((d) => d.n));
    const minimax = all.filter((d) => d.n === smallestN).sort((a, b) => a.en0 - b.en0)[0];
    expect(result.minimax.n).toBe(minimax.n);
    expect(result.minimax.en0).toBeCloseTo(minimax.en0, 12);
    // Every q in [0, 1] is covered by an admissible design attaining the brute-force minimum of q·n + (1 − q)·EN0.
    for (let q = 0; q <= 1.0000001; q += 0.01) {
      const best = Math.min(...all.map((d) => q * d.n + (1 - q) * d.en0));
      const covering = result.admissible.filter((d) => d.qFrom <= q + 1e-12 && q <= d.qTo + 1e-12);
      expect(covering.length).toBeGreaterThan(0);
      for (const d of covering) expect(q * d.n + (1 - q) * d.en0).toBeCloseTo(best, 9);
    }
  });
});

describe('properties of every returned design over a sweep of settings (STATISTICS.md check values)', () => {
  const settings: Array<[number, number, number, number]> = [];
  for (const p0 of [0.05, 0.1, 0.2, 0.4, 0.6, 0.7]) {
    for (const [alpha, beta] of [[0.05, 0.2], [0.1, 0.1], [0.05, 0.1]]) settings.push([p0, p0 + 0.2, alpha, beta]);
  }
  it.each(settings)('when p0 %f, p1 %f, α %f, β %f, then α and 1 − β hold exactly, EN0 = n1 + (1 − PET0)(n − n1), optimal EN0 and minimax n are least', (p0, p1, alpha, beta) => {
    const { optimal, minimax, admissible } = simonDesigns({ p0, p1, alpha, beta });
    for (const d of [optimal, minimax, ...admissible]) checkProperties(d, p0, p1, alpha, beta);
    for (const d of admissible) {
      expect(optimal.en0).toBeLessThanOrEqual(d.en0 + 1e-12);
      expect(minimax.n).toBeLessThanOrEqual(d.n);
    }
    expect(admissible[0].qFrom).toBe(0);
    expect(admissible[admissible.length - 1].qTo).toBe(1);
    admissible.slice(1).forEach((d, i) => expect(d.qFrom).toBeCloseTo(admissible[i].qTo, 12));
  });
});

describe("singleStageDesign (A'Hern 2001, Statistics in Medicine 20:859–866)", () => {
  it.each([
    [0.1, 0.3, 0.05, 0.2],
    [0.2, 0.35, 0.05, 0.1],
    [0.5, 0.65, 0.1, 0.1],
    [0.03, 0.1, 0.025, 0.2],
  ])('when p0 %f, p1 %f, α %f, β %f, then n is the smallest size whose exact test meets both errors', (p0, p1, alpha, beta) => {
    const d = singleStageDesign({ p0, p1, alpha, beta });
    expect(binomUpper(d.r, d.n, p0)).toBeLessThanOrEqual(alpha);
    expect(binomUpper(d.r, d.n, p1)).toBeGreaterThanOrEqual(1 - beta);
    expect(d.typeIError).toBeCloseTo(binomUpper(d.r, d.n, p0), 12);
    expect(d.power).toBeCloseTo(binomUpper(d.r, d.n, p1), 12);
    for (let n = 1; n < d.n; n++) {
      for (let r = 0; r <= n; r++) {
        expect(binomUpper(r, n, p0) <= alpha && binomUpper(r, n, p1) >= 1 - beta, `n=${n} r=${r}`).toBe(false);
      }
    }
  });
});

describe('operatingCharacteristics', () => {
  it('when evaluated at p0 and p1, then it reproduces the type I error, power, PET0 and EN0 of the design', () => {
    const { optimal } = simonDesigns({ p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2 });
    const [at0, at1] = operatingCharacteristics(optimal, [0.2, 0.4]);
    expect(at0.probPromising).toBeCloseTo(optimal.typeIError, 12);
    expect(at1.probPromising).toBeCloseTo(optimal.power, 12);
    expect(at0.pet).toBeCloseTo(optimal.pet0, 12);
    expect(at0.expectedN).toBeCloseTo(optimal.en0, 10);
  });

  it('when the design is single-stage, then nothing stops early and the expected size is n', () => {
    const [point] = operatingCharacteristics({ r: 5, n: 25 }, [0.3]);
    expect(point).toEqual({ p: 0.3, probPromising: expect.closeTo(binomUpper(5, 25, 0.3), 12), pet: 0, expectedN: 25 });
  });
});

describe('design input validation', () => {
  function fieldOf(call: () => unknown): { field: string; message: string } {
    try {
      call();
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      return error as StatsInputError;
    }
    throw new Error('expected a StatsInputError');
  }

  it.each([
    ['p1', () => simonDesigns({ p0: 0.3, p1: 0.3, alpha: 0.05, beta: 0.2 })],
    ['p0', () => simonDesigns({ p0: 1.2, p1: 0.3, alpha: 0.05, beta: 0.2 })],
    ['alpha', () => singleStageDesign({ p0: 0.1, p1: 0.3, alpha: 0, beta: 0.2 })],
    ['beta', () => singleStageDesign({ p0: 0.1, p1: 0.3, alpha: 0.5, beta: 0.5 })],
    ['nmax', () => simonDesigns({ p0: 0.1, p1: 0.3, alpha: 0.05, beta: 0.2, nmax: 2.5 })],
    ['r1', () => operatingCharacteristics({ r1: 5, n1: 5, r: 8, n: 20 }, [0.2])],
    ['n1', () => operatingCharacteristics({ r1: 1, n1: 20, r: 8, n: 20 }, [0.2])],
    ['ps', () => operatingCharacteristics({ r: 3, n: 20 }, [1.5])],
  ])('when %s is invalid, then the error names it', (field, call) => {
    expect(fieldOf(call).field).toBe(field);
  });

  it('when nmax is too small for the requested power, then the error says so and gives the smallest size that works', () => {
    const single = fieldOf(() => singleStageDesign({ p0: 0.1, p1: 0.3, alpha: 0.05, beta: 0.2, nmax: 20 }));
    expect(single.field).toBe('nmax');
    expect(single.message).toContain('at most 20 patients');
    expect(single.message).toContain('is 25');
    const twoStage = fieldOf(() => simonDesigns({ p0: 0.1, p1: 0.3, alpha: 0.05, beta: 0.2, nmax: 20 }));
    expect(twoStage.field).toBe('nmax');
    expect(twoStage.message).toContain('is 25');
  });
});
