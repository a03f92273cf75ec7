/**
 * Inference after a two-stage design: stage-wise ordering p-value and interval (Koyama & Chen 2008,
 * Statistics in Medicine 27:3145–3154) and the UMVUE (Jung & Kim 2004, Statistics in Medicine 23:881–896).
 */
import { describe, expect, it } from 'vitest';
import { StatsInputError, binomialTest, proportionInterval, twoStageInference } from '../../server/stats';
import { binomPmf, binomUpper, logChoose } from './reference';

const design = { r1: 3, n1: 13, r: 12, n: 43, p0: 0.2 };

/** Stage-wise p-value for a stage-2 total s, summed directly over the sample space. */
function stageWisePValue(s: number, p: number, n2 = design.n - design.n1): number {
  let total = 0;
  for (let x1 = design.r1 + 1; x1 <= design.n1; x1++) total += binomPmf(x1, design.n1, p) * binomUpper(s - x1 - 1, n2, p);
  return total;
}

describe('twoStageInference (Koyama & Chen 2008)', () => {
  it('when the trial stopped at stage 1, then its p-value exceeds that of every outcome reaching stage 2', () => {
    const smallestStageTwo = twoStageInference(design, { x1: 4, x2: 0 }).pValue;
    for (let x1 = 0; x1 <= design.r1; x1++) {
      expect(twoStageInference(design, { x1 }).pValue).toBeGreaterThan(smallestStageTwo);
    }
  });

  it('when the trial reached stage 2, then the p-value is the stage-wise tail summed directly', () => {
    for (const [x1, x2] of [[4, 0], [5, 9], [7, 12], [13, 30]]) {
      expect(twoStageInference(design, { x1, x2 }).pValue).toBeCloseTo(stageWisePValue(x1 + x2, 0.2), 12);
    }
  });

  it('when the stage-2 total grows, then the p-value falls and the interval moves up', () => {
    let previous = twoStageInference(design, { x1: 4, x2: 0 });
    for (let x2 = 1; x2 <= 30; x2++) {
      const next = twoStageInference(design, { x1: 4, x2 });
      expect(next.pValue).toBeLessThan(previous.pValue);
      expect(next.ci[0]).toBeGreaterThan(previous.ci[0]);
      expect(next.ci[1]).toBeGreaterThan(previous.ci[1]);
      previous = next;
    }
  });

  it('when the interval is inverted, then each limit leaves (1 − confLevel)/2 in its tail', () => {
    const { ci } = twoStageInference(design, { x1: 5, x2: 9, confLevel: 0.9 });
    expect(stageWisePValue(14, ci[0])).toBeCloseTo(0.05, 9);
    expect(1 - stageWisePValue(15, ci[1])).toBeCloseTo(0.05, 9);
  });

  it('when the trial stopped at stage 1, then estimate and interval are those of x1 of n1 (Clopper & Pearson 1934)', () => {
    const result = twoStageInference(design, { x1: 2 });
    expect(result.umvue).toBe(2 / 13);
    expect(result.ci).toEqual(proportionInterval(2, 13));
    expect(result.pValue).toBeCloseTo(binomialTest(2, 13, 0.2, { alternative: 'greater' }).pValue, 14);
  });

  it('when stage 2 was larger than planned, then n2Actual defines the sample space and the naive estimate', () => {
    const result = twoStageInference(design, { x1: 5, x2: 10, n2Actual: 34 });
    expect(result.naiveEstimate).toBe(15 / 47);
    expect(result.pValue).toBeCloseTo(stageWisePValue(15, 0.2, 34), 12);
  });
});

describe('UMVUE (Jung & Kim 2004)', () => {
  it('when computed for every stage-2 outcome, then it lies in [0, 1] and rises with the total', () => {
    let previous = -1;
    for (let x2 = 0; x2 <= 30; x2++) {
      const { umvue } = twoStageInference(design, { x1: 6, x2 });
      expect(umvue).toBeGreaterThanOrEqual(0);
      expect(umvue).toBeLessThanOrEqual(1);
      expect(umvue).toBeGreaterThan(previous);
      previous = umvue;
    }
  });

  it('when compared with the Rao–Blackwell ratio of binomial coefficients summed directly, then they agree', () => {
    const { r1, n1 } = design;
    const n2 = 30;
    const s = 14;
    let num = 0;
    let den = 0;
    for (let x1 = r1 + 1; x1 <= Math.min(s, n1); x1++) {
      num += Math.exp(logChoose(n1 - 1, x1 - 1) + logChoose(n2, s - x1));
      den += Math.exp(logChoose(n1, x1) + logChoose(n2, s - x1));
    }
    expect(twoStageInference(design, { x1: 5, x2: 9 }).umvue).toBeCloseTo(num / den, 12);
  });

  it('when n1 = n (a single stage), then the UMVUE equals the naive estimate and the p-value the binomial test', () => {
    const single = { r1: 2, n1: 25, r: 5, n: 25, p0: 0.1 };
    for (const x1 of [3, 6, 12, 25]) {
      const result = twoStageInference(single, { x1 });
      expect(result.umvue).toBeCloseTo(x1 / 25, 14);
      expect(result.umvue).toBeCloseTo(result.naiveEstimate, 14);
      expect(result.pValue).toBeCloseTo(binomialTest(x1, 25, 0.1, { alternative: 'greater' }).pValue, 12);
    }
  });
});

describe('twoStageInference validation', () => {
  it.each([
    ['x2', { x1: 2, x2: 4 }],
    ['x2', { x1: 5 }],
    ['x1', { x1: 14 }],
    ['x2', { x1: 5, x2: 31 }],
    ['confLevel', { x1: 5, x2: 3, confLevel: 1 }],
  ])('when %s is invalid, then the error names it', (field, observed) => {
    try {
      twoStageInference(design, observed);
      expect.unreachable('expected a StatsInputError');
    } catch (error) {
      expect(error).toBeInstanceOf(StatsInputError);
      expect((error as StatsInputError).field).toBe(field);
    }
  });
});
