/**
 * Interim decision rules of a two-stage design, including decisions settled before the end of a stage.
 */
import { describe, expect, it } from 'vitest';
import { StatsInputError, evaluateTwoStage } from '../../server/stats';

// Simon (1989) optimal design for p0 0.20, p1 0.40: stop if ≤ 3 of 13, promising if > 12 of 43.
const design = { r1: 3, n1: 13, r: 12, n: 43 };

describe('evaluateTwoStage, stage 1', () => {
  it('when r1 + 1 responders are reached before n1, then stage 1 is settled early (common practice)', () => {
    const status = evaluateTwoStage(design, { responders: 4, evaluable: 8 });
    expect(status).toMatchObject({ stage: 'stage1', decision: 'continue', determinedEarly: true, remainingToDecide: 0 });
    expect(status.message).toBe(
      'Stage 1 is settled: 4 responders already exceed r1 = 3, so stage 1 cannot end in a futility stop; 5 patients of stage 1 remain to be evaluated.',
    );
  });

  it('when stage 1 ends with at most r1 responders, then the futility rule is met at n1 (common practice)', () => {
    const status = evaluateTwoStage(design, { responders: 2, evaluable: 13 });
    expect(status).toMatchObject({ stage: 'stage1', decision: 'stop-futility', determinedEarly: false, remainingToDecide: 0 });
    expect(status.message).toBe('Stage 1 ended with 2 responders among 13 (≤ r1 = 3): the futility rule is met.');
  });

  it('when even all remaining stage-1 patients responding cannot exceed r1, then futility is settled early (common practice)', () => {
    const status = evaluateTwoStage(design, { responders: 0, evaluable: 11 });
    expect(status).toMatchObject({ decision: 'stop-futility', determinedEarly: true, remainingToDecide: 0 });
    expect(status.message).toContain('at most 2 responders are possible');
  });

  it('when neither threshold can yet be reached for sure, then stage 1 is undetermined and the rest of the stage may be needed', () => {
    const status = evaluateTwoStage(design, { responders: 2, evaluable: 8 });
    expect(status).toMatchObject({ stage: 'stage1', decision: 'undetermined', determinedEarly: false, remainingToDecide: 5 });
    expect(status.message).toContain('2 more responders pass stage 1');
  });

  it('when stage 1 is complete with more than r1 responders, then the trial continues to stage 2 without being early', () => {
    expect(evaluateTwoStage(design, { responders: 5, evaluable: 13 })).toMatchObject({ decision: 'continue', determinedEarly: false });
  });

  it('when more than r responders are seen during stage 1, then the final result is already promising (common practice)', () => {
    expect(evaluateTwoStage({ r1: 1, n1: 10, r: 5, n: 29 }, { responders: 6, evaluable: 9 })).toMatchObject({
      stage: 'stage1',
      decision: 'promising',
      determinedEarly: true,
    });
  });
});

describe('evaluateTwoStage, final rule', () => {
  it('when r + 1 responders are reached before n, then the trial is promising early (common practice)', () => {
    const status = evaluateTwoStage(design, { responders: 13, evaluable: 30, stage1Responders: 5 });
    expect(status).toMatchObject({ stage: 'stage2', decision: 'promising', determinedEarly: true, remainingToDecide: 0 });
  });

  it('when too few patients remain to exceed r, then the trial is not promising early (common practice)', () => {
    const status = evaluateTwoStage(design, { responders: 6, evaluable: 37, stage1Responders: 4 });
    expect(status).toMatchObject({ stage: 'stage2', decision: 'not-promising', determinedEarly: true });
  });

  it('when all n patients are evaluated with at most r responders, then the trial is not promising, not early', () => {
    expect(evaluateTwoStage(design, { responders: 12, evaluable: 43 })).toMatchObject({ decision: 'not-promising', determinedEarly: false });
  });

  it('when the final rule is still open, then the remaining patients of the trial may be needed', () => {
    expect(evaluateTwoStage(design, { responders: 10, evaluable: 30, stage1Responders: 5 })).toMatchObject({
      decision: 'undetermined',
      remainingToDecide: 13,
    });
  });

  it('when stage 1 had at most r1 responders but stage 2 was recorded, then the futility stop still stands', () => {
    expect(evaluateTwoStage(design, { responders: 9, evaluable: 25, stage1Responders: 3 })).toMatchObject({ decision: 'stop-futility' });
  });

  it('when the design is single-stage, then only the final rule applies', () => {
    expect(evaluateTwoStage({ r: 5, n: 25 }, { responders: 6, evaluable: 20 })).toMatchObject({
      stage: 'single',
      decision: 'promising',
      determinedEarly: true,
    });
    expect(evaluateTwoStage({ r: 5, n: 25 }, { responders: 3, evaluable: 20 })).toMatchObject({ decision: 'undetermined', remainingToDecide: 5 });
  });
});

describe('evaluateTwoStage validation', () => {
  it.each([
    ['evaluable', { responders: 1, evaluable: 44 }],
    ['responders', { responders: 9, evaluable: 8 }],
    ['stage1Responders', { responders: 9, evaluable: 20, stage1Responders: 14 }],
    ['stage1Responders', { responders: 3, evaluable: 10, stage1Responders: 2 }],
    ['evaluable', { responders: 1, evaluable: 1.5 }],
  ])('when %s is inconsistent, then the error names it', (field, counts) => {
    expect(() => evaluateTwoStage(design, counts)).toThrow(StatsInputError);
    try {
      evaluateTwoStage(design, counts);
    } catch (error) {
      expect((error as StatsInputError).field).toBe(field);
    }
  });
});
