/**
 * Where a running trial stands against its design's decision rules.
 *
 * Stage 1 of a two-stage design (evaluable ≤ n1): the stage is passed once responders exceed r1, and
 * the futility rule is met once even all remaining stage-1 patients responding could not lift the
 * count above r1. The final rule (stage 2, or the only stage of a single-stage design) works the same
 * way with r and n. A rule settled before its last patient is "determined early".
 *
 * `remainingToDecide` counts the most further evaluable patients that may be needed before the
 * current rule is settled: 0 once settled, otherwise the patients left in the current stage (the last
 * of them always settles it).
 */
import { StatsInputError, requireAtMost, requireCount } from './errors.js';
import { type DesignRule, validateRule } from './designs.js';

/** Which rule is being applied: stage 1 or stage 2 of a two-stage design, or a single-stage design's only rule. */
export type InterimStage = 'stage1' | 'stage2' | 'single';
export type InterimDecision = 'continue' | 'stop-futility' | 'promising' | 'not-promising' | 'undetermined';

export interface InterimCounts {
  responders: number;
  evaluable: number;
  /** Responders among the first n1 evaluable patients; only meaningful once stage 2 has begun. */
  stage1Responders?: number;
}

export interface InterimStatus {
  stage: InterimStage;
  decision: InterimDecision;
  determinedEarly: boolean;
  remainingToDecide: number;
  message: string;
}

function count(k: number, noun: string): string {
  return `${k} ${noun}${k === 1 ? '' : 's'}`;
}

function validateCounts(design: DesignRule, counts: InterimCounts, n1: number, twoStage: boolean): void {
  if (typeof counts !== 'object' || counts === null) {
    throw new StatsInputError('responders', 'Counts of responders and evaluable patients are required.');
  }
  const evaluable = requireCount('evaluable', counts.evaluable);
  requireAtMost('evaluable', evaluable, 'n', design.n);
  const responders = requireCount('responders', counts.responders);
  requireAtMost('responders', responders, 'evaluable', evaluable);
  if (counts.stage1Responders === undefined) return;
  const first = requireCount('stage1Responders', counts.stage1Responders);
  if (!twoStage) throw new StatsInputError('stage1Responders', 'stage1Responders applies only to a two-stage design.');
  requireAtMost('stage1Responders', first, 'responders', responders);
  requireAtMost('stage1Responders', first, 'n1', n1);
  if (evaluable <= n1 && first !== responders) {
    throw new StatsInputError('stage1Responders', `While stage 1 is running, stage1Responders (${first}) must equal responders (${responders}).`);
  }
  if (evaluable > n1 && responders - first > evaluable - n1) {
    throw new StatsInputError(
      'stage1Responders',
      `${responders - first} stage-2 responders cannot come from ${evaluable - n1} stage-2 patients; check stage1Responders.`,
    );
  }
}

/**
 * Where responders stand against "more than r among size" with `decided` outcomes in: above r
 * already, at most r whatever the rest show, or open. `left` counts the places still undecided; when
 * open, `toSettle` gives the further responders that lift the count above r and the further
 * non-responders that keep it at or below r.
 */
export function settleRule(r: number, size: number, responders: number, decided: number) {
  const left = size - decided;
  if (responders > r) return { state: 'above' as const, early: left > 0, left, toSettle: null };
  if (responders + left <= r) return { state: 'at-most' as const, early: left > 0, left, toSettle: null };
  return { state: 'open' as const, early: false, left, toSettle: { responders: r + 1 - responders, nonResponders: size - r - (decided - responders) } };
}

function stageOne(r1: number, n1: number, r: number, responders: number, evaluable: number): InterimStatus {
  const rule = settleRule(r1, n1, responders, evaluable);
  const left = rule.left;
  const leftText = left > 0 ? `${count(left, 'patient')} of stage 1 remain to be evaluated` : 'stage 1 is complete';
  if (responders > r) {
    return {
      stage: 'stage1',
      decision: 'promising',
      determinedEarly: true,
      remainingToDecide: 0,
      message: `Already ${count(responders, 'responder')}, more than r = ${r}: stage 1 is passed and the final analysis will be promising whatever the remaining patients show; ${leftText}.`,
    };
  }
  if (rule.state === 'above') {
    return {
      stage: 'stage1',
      decision: 'continue',
      determinedEarly: rule.early,
      remainingToDecide: 0,
      message:
        left > 0
          ? `Stage 1 is settled: ${count(responders, 'responder')} already exceed r1 = ${r1}, so stage 1 cannot end in a futility stop; ${leftText}.`
          : `Stage 1 is passed: ${count(responders, 'responder')} among ${n1} exceed r1 = ${r1}; continue to stage 2.`,
    };
  }
  if (rule.state === 'at-most') {
    return {
      stage: 'stage1',
      decision: 'stop-futility',
      determinedEarly: rule.early,
      remainingToDecide: 0,
      message:
        left > 0
          ? `The futility rule is already met: with ${count(responders, 'responder')} among ${evaluable} and ${count(left, 'patient')} of stage 1 left, at most ${responders + left} responders are possible, not more than r1 = ${r1}.`
          : `Stage 1 ended with ${count(responders, 'responder')} among ${n1} (≤ r1 = ${r1}): the futility rule is met.`,
    };
  }
  const { responders: needed, nonResponders: failures } = rule.toSettle;
  return {
    stage: 'stage1',
    decision: 'undetermined',
    determinedEarly: false,
    remainingToDecide: left,
    message: `Stage 1 is not yet decided: ${count(responders, 'responder')} among ${evaluable}. ${needed} more ${needed === 1 ? 'responder passes' : 'responders pass'} stage 1 (more than r1 = ${r1}); ${failures} more ${failures === 1 ? 'non-responder meets' : 'non-responders meet'} the futility rule. At most ${count(left, 'patient')} of stage 1 remain.`,
  };
}

function finalRule(stage: InterimStage, r: number, n: number, responders: number, evaluable: number): InterimStatus {
  const rule = settleRule(r, n, responders, evaluable);
  const left = rule.left;
  const name = stage === 'single' ? 'The trial' : 'The final analysis';
  if (rule.state === 'above') {
    return {
      stage,
      decision: 'promising',
      determinedEarly: rule.early,
      remainingToDecide: 0,
      message:
        left > 0
          ? `${name} is settled as promising: ${count(responders, 'responder')} already exceed r = ${r}; ${count(left, 'patient')} remain to be evaluated.`
          : `${name} is promising: ${count(responders, 'responder')} among ${n} exceed r = ${r}.`,
    };
  }
  if (rule.state === 'at-most') {
    return {
      stage,
      decision: 'not-promising',
      determinedEarly: rule.early,
      remainingToDecide: 0,
      message:
        left > 0
          ? `${name} is settled as not promising: with ${count(responders, 'responder')} and ${count(left, 'patient')} left, at most ${responders + left} responders are possible, not more than r = ${r}.`
          : `${name} is not promising: ${count(responders, 'responder')} among ${n} (≤ r = ${r}).`,
    };
  }
  const { responders: needed, nonResponders: failures } = rule.toSettle;
  return {
    stage,
    decision: 'undetermined',
    determinedEarly: false,
    remainingToDecide: left,
    message: `${name} is not yet decided: ${count(responders, 'responder')} among ${evaluable}. ${needed} more ${needed === 1 ? 'responder makes' : 'responders make'} it promising (more than r = ${r}); ${failures} more ${failures === 1 ? 'non-responder makes' : 'non-responders make'} it not promising. At most ${count(left, 'patient')} remain.`,
  };
}

export function evaluateTwoStage(design: DesignRule, counts: InterimCounts): InterimStatus {
  const { r1, n1, twoStage } = validateRule(design);
  validateCounts(design, counts, n1, twoStage);
  const { responders, evaluable, stage1Responders } = counts;
  if (!twoStage) return finalRule('single', design.r, design.n, responders, evaluable);
  if (evaluable <= n1) return stageOne(r1, n1, design.r, responders, evaluable);
  if (stage1Responders !== undefined && stage1Responders <= r1) {
    return {
      stage: 'stage2',
      decision: 'stop-futility',
      determinedEarly: false,
      remainingToDecide: 0,
      message: `Stage 1 ended with ${count(stage1Responders, 'responder')} among ${n1} (≤ r1 = ${r1}): the futility rule was met, so stage 2 should not have started; later patients do not change that.`,
    };
  }
  return finalRule('stage2', design.r, design.n, responders, evaluable);
}
