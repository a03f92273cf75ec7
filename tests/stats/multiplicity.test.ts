/**
 * Multiplicity adjustments: Holm (1979), Scand J Statist 6:65–70; Benjamini & Hochberg (1995), JRSS B 57:289–300.
 */
import { describe, expect, it } from 'vitest';
import { StatsInputError, adjustPValues } from '../../server/stats';

describe('adjustPValues', () => {
  it('when Holm is applied to a small hand-computed example, then step-down multipliers m, m−1, … hold with monotonicity (common practice)', () => {
    // Sorted: 0.005×4 = 0.02, 0.01×3 = 0.03, 0.03×2 = 0.06, 0.04×1 = 0.04 → raised to 0.06.
    const adjusted = adjustPValues([0.01, 0.04, 0.03, 0.005], 'holm');
    [0.03, 0.06, 0.06, 0.02].forEach((v, i) => expect(adjusted[i]).toBeCloseTo(v, 15));
  });

  it('when Benjamini–Hochberg is applied to a small hand-computed example, then step-up multipliers m/i hold with monotonicity (common practice)', () => {
    // Sorted: 0.005×4 = 0.02, 0.01×2 = 0.02, 0.03×4/3 = 0.04, 0.04×1 = 0.04.
    const adjusted = adjustPValues([0.01, 0.04, 0.03, 0.005], 'bh');
    [0.02, 0.04, 0.04, 0.02].forEach((v, i) => expect(adjusted[i]).toBeCloseTo(v, 15));
    // 0.02×3 = 0.06 exceeds the later 0.04×3/2 = 0.06 and 0.05; the step-up minimum keeps the order.
    const stepUp = adjustPValues([0.02, 0.04, 0.05], 'bh');
    [0.05, 0.05, 0.05].forEach((v, i) => expect(stepUp[i]).toBeCloseTo(v, 15));
  });

  it('when multipliers push past 1, then the results are capped at 1', () => {
    expect(adjustPValues([0.5, 0.6, 0.7], 'holm')).toEqual([1, 1, 1]);
    expect(Math.max(...adjustPValues([0.9, 0.95, 0.99], 'bh'))).toBeLessThanOrEqual(1);
  });

  it('when the list is empty or has one p-value, then nothing changes', () => {
    expect(adjustPValues([], 'holm')).toEqual([]);
    expect(adjustPValues([0.3], 'bh')).toEqual([0.3]);
  });

  it.each([
    ['ps', () => adjustPValues([0.1, 1.2], 'holm')],
    ['method', () => adjustPValues([0.1], 'bonferroni' as never)],
  ])('when %s is invalid, then the error names it', (field, call) => {
    try {
      call();
      expect.unreachable('expected a StatsInputError');
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      expect((error as StatsInputError).field).toBe(field);
    }
  });
});
