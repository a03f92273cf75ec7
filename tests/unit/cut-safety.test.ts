/**
 * The pure safety section of a data cut: the Bryant–Day joint verdict at each point of the design
 * (Bryant & Day 1995, Biometrics 51:1372–1383: stop after stage 1 with at most r1 responses or more
 * than t1 toxicities; promising at n with more than r responses and at most t toxicities), and a
 * cut frozen before adverse events were frozen.
 */
import { describe, expect, it } from 'vitest';
import { cohortSafety, jointVerdict } from '../../server/data-cuts/safety-analysis.js';
import type { Tally } from '../../server/evaluation/index.js';
import type { SafetyRuleState } from '../../server/safety/index.js';

// The paper's worked example: n1 19, r1 5, t1 7; n 33, r 12, t 10.
const DESIGN = { r1: 5, n1: 19, r: 12, n: 33 };
const RULE = { t1: 7, t: 10 };

function tally(stage1: { responders: number; decided: number }, all: { responders: number; decided: number }): Tally {
  const stage = (t: { responders: number; decided: number }) => ({ counted: t.decided, decided: t.decided, responders: t.responders, pending: 0 });
  return { ...stage(all), enrolled: all.decided, notEvaluable: 0, stage1: stage(stage1), stage2: stage({ responders: all.responders - stage1.responders, decided: all.decided - stage1.decided }) };
}

function state(stage1: { toxicities: number; assessable: number }, all: { toxicities: number; assessable: number }): Extract<SafetyRuleState, { rule: 'bryant_day' }> {
  return {
    rule: 'bryant_day',
    toxicities: all.toxicities,
    assessable: all.assessable,
    stage1Toxicities: stage1.toxicities,
    stage1Assessable: stage1.assessable,
    n1: 19,
    t1: 7,
    n: 33,
    t: 10,
    crossed: stage1.toxicities > 7,
    toStage1Limit: Math.max(0, 8 - stage1.toxicities),
    finalLimitExceeded: all.toxicities > 10,
  };
}

describe('the Bryant–Day joint verdict at a cut', () => {
  it('when stage 1 has more than t1 toxicities, then it stops for toxicity whatever the responses', () => {
    expect(jointVerdict(DESIGN, RULE, tally({ responders: 9, decided: 19 }, { responders: 9, decided: 19 }), state({ toxicities: 8, assessable: 19 }, { toxicities: 8, assessable: 19 })).verdict).toBe('stop_toxicity_stage1');
  });

  it('when stage 1 is complete with at most r1 responses, then it stops for response; with one more it goes on to stage 2', () => {
    const tox = state({ toxicities: 3, assessable: 19 }, { toxicities: 3, assessable: 19 });
    expect(jointVerdict(DESIGN, RULE, tally({ responders: 5, decided: 19 }, { responders: 5, decided: 19 }), tox).verdict).toBe('stop_response_stage1');
    expect(jointVerdict(DESIGN, RULE, tally({ responders: 6, decided: 19 }, { responders: 6, decided: 19 }), tox).verdict).toBe('stage2_open');
  });

  it('when stage 1 is not complete, then the verdict is open even with few responses', () => {
    expect(jointVerdict(DESIGN, RULE, tally({ responders: 1, decided: 12 }, { responders: 1, decided: 12 }), state({ toxicities: 2, assessable: 12 }, { toxicities: 2, assessable: 12 })).verdict).toBe('stage1_open');
  });

  it('when all n are in, then more than r responses with at most t toxicities is promising, and either limit missed is not', () => {
    const stage1 = { responders: 7, decided: 19 };
    const tox1 = { toxicities: 4, assessable: 19 };
    expect(jointVerdict(DESIGN, RULE, tally(stage1, { responders: 13, decided: 33 }), state(tox1, { toxicities: 10, assessable: 33 })).verdict).toBe('promising');
    expect(jointVerdict(DESIGN, RULE, tally(stage1, { responders: 13, decided: 33 }), state(tox1, { toxicities: 11, assessable: 33 })).verdict).toBe('not_promising_toxicity');
    expect(jointVerdict(DESIGN, RULE, tally(stage1, { responders: 12, decided: 33 }), state(tox1, { toxicities: 10, assessable: 33 })).verdict).toBe('not_promising_response');
  });
});

describe('a cut frozen before adverse events were frozen', () => {
  it('when its safety is analysed, then it says there is no safety section and counts nothing', () => {
    const cohort = { id: 'c1', code: 'MAIN', name: 'Main', status: 'enrolling_stage_1' as const, design: null };
    const result = cohortSafety({ cohort, patients: [], events: [], eventsFrozen: false, cutOn: '2026-11-30', response: null });
    expect(result).toMatchObject({ eventsFrozen: false, counts: null, state: null, joint: null });
    expect(result.sentences).toEqual(['This data cut was frozen before adverse events were frozen with data cuts: it has no safety section.']);
  });
});
