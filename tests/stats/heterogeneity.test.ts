/**
 * Between-site heterogeneity: Pearson chi-square and the exact conditional test (Fisher's exact test
 * for 2×2 tables, its Freeman–Halton extension for k×2).
 */
import { describe, expect, it } from 'vitest';
import { StatsInputError, heterogeneity } from '../../server/stats';
import { logChoose } from './reference';

/** Brute-force exact p-value: every table with the observed margins, summed if no more likely than observed. */
function bruteForceExact(table: Array<[number, number]>): number {
  const totals = table.map(([a, b]) => a + b);
  const responders = table.reduce((s, [a]) => s + a, 0);
  const total = totals.reduce((s, t) => s + t, 0);
  const logProb = (as: number[]) => as.reduce((s, a, i) => s + logChoose(totals[i], a), 0) - logChoose(total, responders);
  const observed = logProb(table.map(([a]) => a));
  let sum = 0;
  const walk = (i: number, placed: number[]) => {
    if (i === totals.length - 1) {
      const last = responders - placed.reduce((s, a) => s + a, 0);
      if (last < 0 || last > totals[i]) return;
      const lp = logProb([...placed, last]);
      if (lp <= observed + 1e-7) sum += Math.exp(lp);
      return;
    }
    for (let a = 0; a <= totals[i]; a++) walk(i + 1, [...placed, a]);
  };
  walk(0, []);
  return sum;
}

describe("heterogeneity, Fisher's exact test on a 2×2 table", () => {
  it('when the table is [[3, 1], [1, 3]], then the exact p-value is the hand-computed hypergeometric sum (1 + 16 + 16 + 1)/70', () => {
    // C(4, a)·C(4, 4 − a)/C(8, 4) for a = 0..4: 1, 16, 36, 16, 1 over 70; the observed a = 3 has 16/70.
    expect(heterogeneity([[3, 1], [1, 3]]).pValueExact).toBeCloseTo(34 / 70, 14);
  });

  it('when the table is [[3, 1], [1, 3]], then chi-square is 2 on 1 df and its p-value is erfc(1) (common practice)', () => {
    const result = heterogeneity([[3, 1], [1, 3]]);
    expect(result.chiSquare).toBeCloseTo(2, 14);
    expect(result.df).toBe(1);
    expect(result.pValueChiSquare).toBeCloseTo(0.15729920705028513, 13);
  });
});

describe('heterogeneity, k×2 tables (Freeman–Halton exact test, Pearson chi-square)', () => {
  it.each([
    [[[5, 10], [8, 7], [2, 13], [6, 6]]],
    [[[0, 9], [4, 4], [7, 2]]],
    [[[1, 0], [0, 1], [3, 3], [2, 5], [6, 1]]],
  ] as Array<[Array<[number, number]>]>)('when the table is %j, then the exact p-value matches full enumeration', (table) => {
    expect(heterogeneity(table).pValueExact).toBeCloseTo(bruteForceExact(table), 12);
  });

  it('when there are three sites, then the chi-square p-value on 2 df is exp(−χ²/2) (common practice)', () => {
    const result = heterogeneity([[0, 9], [4, 4], [7, 2]]);
    expect(result.df).toBe(2);
    expect(result.pValueChiSquare).toBeCloseTo(Math.exp(-result.chiSquare / 2), 14);
  });

  it('when a site has no patients, then it is left out of the comparison', () => {
    expect(heterogeneity([[3, 1], [0, 0], [1, 3]])).toEqual(heterogeneity([[3, 1], [1, 3]]));
  });

  it('when every patient responded, then there is nothing to compare and both p-values are 1', () => {
    expect(heterogeneity([[4, 0], [6, 0]])).toEqual({ chiSquare: 0, df: 1, pValueChiSquare: 1, pValueExact: 1 });
  });

  it('when the table is too large to enumerate (ten sites of forty), then the exact p-value is null, promptly', () => {
    const started = performance.now();
    const table: Array<[number, number]> = [[10, 30], [15, 25], [8, 32], [20, 20], [12, 28], [9, 31], [14, 26], [11, 29], [16, 24], [7, 33]];
    const result = heterogeneity(table);
    expect(result.pValueExact).toBeNull();
    expect(result.pValueChiSquare).toBeGreaterThan(0);
    expect(performance.now() - started).toBeLessThan(3000);
  });

  it.each([
    [[[3, 1]]],
    [[[3, -1], [2, 2]]],
    [[[3, 1.5], [2, 2]]],
  ] as Array<[Array<[number, number]>]>)('when the table is %j, then the error names the table', (table) => {
    try {
      heterogeneity(table);
      expect.unreachable('expected a StatsInputError');
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      expect((error as StatsInputError).field).toBe('table');
    }
  });
});
