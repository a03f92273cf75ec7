/**
 * Exact binomial test and one-proportion intervals, checked against an independent library, exact
 * rational arithmetic, published worked examples and closed forms.
 */
import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import stdlibBinomialTest from '@stdlib/stats-binomial-test';
import { StatsInputError, binomialTest, proportionInterval } from '../../server/stats';
import { near } from './reference';

const ALTERNATIVES = ['two-sided', 'less', 'greater'] as const;

function grid(): Array<[number, number, number]> {
  const cases: Array<[number, number, number]> = [];
  for (const n of [1, 2, 5, 12, 29, 50, 100, 263, 1000, 4321, 10_000]) {
    for (const p0 of [0.01, 0.05, 0.1, 0.2, 0.3, 0.5, 0.65, 0.8, 0.95, 0.99]) {
      const sd = Math.sqrt(n * p0 * (1 - p0));
      const xs = new Set([0, 1, n - 1, n, Math.floor(n / 3), Math.round(n * p0), Math.round(n * p0 + 2 * sd), Math.round(n * p0 - 2.5 * sd)]);
      for (const x of xs) if (x >= 0 && x <= n) cases.push([x, n, p0]);
    }
  }
  return cases;
}

describe('binomialTest agrees with @stdlib/stats-binomial-test (Clopper & Pearson 1934, Biometrika 26:404–413)', () => {
  it('when the grid covers x = 0, x = n and n up to 10,000, then p-values and limits agree to 1e-9 relative (1e-12 absolute near 0)', () => {
    const cases = grid();
    expect(cases.length).toBeGreaterThan(600);
    for (const [x, n, p0] of cases) {
      for (const alternative of ALTERNATIVES) {
        for (const confLevel of [0.95, 0.9]) {
          const ours = binomialTest(x, n, p0, { alternative, confLevel });
          const ref = stdlibBinomialTest(x, n, { p: p0, alternative, alpha: 1 - confLevel });
          const label = `${x}/${n} p0=${p0} ${alternative} ${confLevel}`;
          expect(near(ours.pValue, ref.pValue, 1e-9, 1e-12), `${label} p ${ours.pValue} vs ${ref.pValue}`).toBe(true);
          expect(near(ours.ci[0], ref.ci[0], 1e-9, 1e-12), `${label} lower`).toBe(true);
          expect(near(ours.ci[1], ref.ci[1], 1e-9, 1e-12), `${label} upper`).toBe(true);
        }
      }
    }
  });
});

describe('binomialTest tails against exact rational sums (common practice: P(X ≥ x) = Σ C(n, k) / 2^n at p0 = 1/2)', () => {
  it('when the tail is as small as 1e-290, then the one-sided p-value keeps 1e-12 relative accuracy', () => {
    const n = 1500;
    const choose: bigint[] = [1n];
    for (let k = 1; k <= n; k++) choose[k] = (choose[k - 1] * BigInt(n - k + 1)) / BigInt(k);
    for (const x of [751, 800, 900, 1100, 1300, 1400]) {
      let tail = 0n;
      for (let k = x; k <= n; k++) tail += choose[k];
      // tail / 2^n as a double, via 60 significant bits of the ratio.
      const shift = BigInt(Math.max(0, tail.toString(2).length - 60));
      // Two factors, since 2^(shift − n) alone can fall below the smallest double.
      const exact = Number(tail >> shift) * 2 ** -1000 * 2 ** (Number(shift) - n + 1000);
      expect(near(binomialTest(x, n, 0.5, { alternative: 'greater' }).pValue, exact, 1e-12), `x=${x}`).toBe(true);
    }
  });
});

describe('binomialTest at n = 10,000,000', () => {
  it('when n = 1e7, then p-values and limits match the reference library to 1e-6 (its own tails drift by ~1e-9 there)', () => {
    const twoSided = binomialTest(3_001_234, 10_000_000, 0.3);
    const twoSidedRef = stdlibBinomialTest(3_001_234, 10_000_000, { p: 0.3 });
    expect(near(twoSided.pValue, twoSidedRef.pValue, 1e-6)).toBe(true);
    expect(near(twoSided.ci[1], twoSidedRef.ci[1], 1e-9)).toBe(true);
    const greater = binomialTest(3_004_000, 10_000_000, 0.3, { alternative: 'greater' });
    const ref = stdlibBinomialTest(3_004_000, 10_000_000, { p: 0.3, alternative: 'greater' });
    expect(near(greater.pValue, ref.pValue, 1e-6)).toBe(true);
    expect(near(greater.ci[0], ref.ci[0], 1e-9)).toBe(true);
  });
});

describe('proportionInterval', () => {
  // Newcombe (1998), Statistics in Medicine 17:857–872, Table I; values recalled from memory.
  it.each([
    [81, 263, 'wilson', 0.2553, 0.3662],
    [81, 263, 'clopper-pearson', 0.2527, 0.3676],
    [15, 148, 'wilson', 0.0624, 0.1605],
    [0, 20, 'wilson', 0, 0.1611],
    [1, 29, 'wilson', 0.0061, 0.1718],
  ] as const)('when x/n = %i/%i by %s, then the 95%% interval is %f to %f (Newcombe 1998, Table I, recalled from memory)', (x, n, method, lo, hi) => {
    const [a, b] = proportionInterval(x, n, { method });
    expect(a).toBeCloseTo(lo, 4);
    expect(b).toBeCloseTo(hi, 4);
  });

  it('when the Wilson interval is computed, then both limits solve (p − x/n)² = z²·p(1 − p)/n (Wilson 1927, JASA 22:209–212)', () => {
    for (const [x, n, conf] of [[3, 17, 0.95], [40, 41, 0.9], [120, 700, 0.99], [1, 2, 0.8]]) {
      const z = jStat.normal.inv(1 - (1 - conf) / 2, 0, 1);
      for (const p of proportionInterval(x, n, { method: 'wilson', confLevel: conf })) {
        expect((p - x / n) ** 2 - (z * z * p * (1 - p)) / n).toBeCloseTo(0, 12);
      }
    }
  });

  it('when the Jeffreys interval is computed, then its limits are the Beta(x + ½, n − x + ½) quantiles (Brown, Cai & DasGupta 2001, Statistical Science 16:101–133)', () => {
    for (const [x, n] of [[0, 10], [1, 10], [7, 23], [30, 30], [12, 90]]) {
      const [lo, hi] = proportionInterval(x, n, { method: 'jeffreys' });
      // jStat's own incomplete beta (100-term continued fraction) is independent and good to ~1e-7 here.
      if (x === 0) expect(lo).toBe(0);
      else expect(jStat.ibeta(lo, x + 0.5, n - x + 0.5)).toBeCloseTo(0.025, 6);
      if (x === n) expect(hi).toBe(1);
      else expect(jStat.ibeta(hi, x + 0.5, n - x + 0.5)).toBeCloseTo(0.975, 6);
    }
  });

  it('when x = 0, then Clopper–Pearson has the closed-form upper limit 1 − (α/2)^(1/n) (Clopper & Pearson 1934)', () => {
    for (const n of [1, 7, 100, 10_000, 10_000_000]) {
      const [lo, hi] = proportionInterval(0, n);
      expect(lo).toBe(0);
      expect(near(hi, -Math.expm1(Math.log(0.025) / n), 1e-12)).toBe(true);
    }
  });
});

describe('binomial input validation (the API returns the field with a 400)', () => {
  it.each([
    ['x', () => binomialTest(11, 10, 0.5)],
    ['x', () => binomialTest(2.5, 10, 0.5)],
    ['x', () => binomialTest(-1, 10, 0.5)],
    ['n', () => binomialTest(0, 0, 0.5)],
    ['p0', () => binomialTest(3, 10, 1)],
    ['p0', () => binomialTest(3, 10, 0)],
    ['alternative', () => binomialTest(3, 10, 0.5, { alternative: 'both' as never })],
    ['confLevel', () => binomialTest(3, 10, 0.5, { confLevel: 95 })],
    ['method', () => proportionInterval(3, 10, { method: 'exact' as never })],
  ])('when %s is invalid, then a StatsInputError names it', (field, call) => {
    try {
      call();
      expect.unreachable('expected a StatsInputError');
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      expect((error as StatsInputError).field).toBe(field);
      expect((error as StatsInputError).message.length).toBeGreaterThan(10);
    }
  });
});
