/**
 * One verdict per cohort and look, the same for the live evaluation, a data cut, its report and its
 * exports. Numbers and states only; server/words/verdicts.ts words them.
 *
 * The rules (also stated to readers by VERDICT_RULES in server/words/verdicts.ts and in the README):
 * 1. Stage 1 is the first n1 counting patients. Patients counted beyond n1 while the stage-1 rule
 *    decides (before the interim decision) are stage-2 patients enrolled at risk: they are counted
 *    (`atRisk`) and left out of the stage-1 rule. No stage-1 threshold is ever adjusted.
 * 2. A final analysis keeps the planned n1 and r1. Once stage 1 is passed the verdict is the final
 *    rule over the attained design (stage 1 as enrolled, stage 2 of m2 counting patients): at the
 *    planned sizes the planned r; otherwise r′, the threshold the stage-wise p-value over the
 *    attained design implies (more than r′ responders exactly when p ≤ α), so the threshold and the
 *    p-value cannot disagree. Koyama & Chen's (2008) §4 p-value, which keeps the planned design, is
 *    reported beside it as a sensitivity figure where m2 differs from the plan. A cohort that did not
 *    pass stage 1 is judged by the stage-1 rule alone.
 * 3. Single-stage: every look uses the threshold for the attained n — the planned r at the planned n,
 *    else the exact binomial test's threshold at level α — so an interim and a final look on the same
 *    patients agree.
 * 4. A verdict that outcomes still pending (or, before the final analysis, patients still to enrol)
 *    could change is undetermined, with how many could change it. At a final analysis no place is
 *    left to fill: only pending outcomes can change a verdict.
 *
 * The look: 'stage-1' before the interim decision, 'stage-2' once stage 2 is under way, 'final' at the
 * final analysis (the sizes are then the attained ones). Single-stage designs treat both interim looks
 * alike, with n the larger of the planned n and the patients counted.
 */
import { StatsInputError, requireCount, requireOpenUnit } from './errors.js';
import { singleStageCutoff } from './designs.js';
import { binomialSf } from './binomial.js';
import { settleRule, type InterimDecision } from './interim.js';
import { stageWisePValue, stageWiseThreshold } from './inference.js';
import { koyamaChenPValue } from './koyama-chen.js';

export type VerdictLook = 'stage-1' | 'stage-2' | 'final';

export interface VerdictDesign {
  r1: number | null;
  n1: number | null;
  r: number;
  n: number;
  p0: number;
  alpha: number;
}

/** Counting patients of one stage: how many count, how many have a decided outcome, responders, pending. */
export interface StageCounts {
  counted: number;
  decided: number;
  responders: number;
  pending: number;
}

/** Stage 1 is the first n1 counting patients (every patient of a single-stage design), stage 2 the rest. */
export interface VerdictCounts {
  stage1: StageCounts;
  stage2: StageCounts;
}

/** The p-value a final verdict follows, with the sensitivity figure where the attained stage 2 differs from the plan. */
export interface FinalTest {
  method: 'stage-wise' | 'exact-binomial';
  /** Over the decided patients: the stage-wise p-value (two-stage) or the exact one-sided binomial p-value (single-stage). */
  pValue: number;
  /** Stage-1 size and stage-2 size the p-value was computed over (stage 2: 0 for a single-stage design or a stop after stage 1). */
  n1: number;
  m2: number;
  alpha: number;
  /** Koyama & Chen (2008) §4 with the planned design kept, and whether it falls on the same side of α. */
  sensitivity: { pValue: number; agrees: boolean } | null;
}

export interface Verdict {
  look: VerdictLook;
  /** The rule the decision rests on: the stage-1 futility rule, or the final rule (a single-stage design's only rule). */
  applied: 'stage1' | 'final';
  decision: InterimDecision;
  /** Settled although outcomes are pending or places are still to fill. */
  determinedEarly: boolean;
  /** What the rule counts: responders among decided patients, of all counting patients (stage 1 alone under the stage-1 rule). */
  responders: number;
  decided: number;
  counted: number;
  /** Responders must exceed r among n; `attained` when r is the threshold for attained sizes rather than the plan's. */
  threshold: { r: number; n: number; source: 'planned' | 'attained' };
  /** The attained sizes the final rule applies to (stage 1, whole cohort); null under the stage-1 rule. */
  attained: { n1: number | null; n: number } | null;
  /** Stage-2 patients enrolled while the stage-1 rule decides: counted, and left out of that rule. */
  atRisk: number;
  /** While undetermined: pending outcomes that could change the verdict, and places not yet enrolled (0 at a final analysis). */
  pendingThatCanChange: number;
  placesLeft: number;
  /** While undetermined: further responders that settle it the positive way, further non-responders the negative way. */
  toSettle: { responders: number; nonResponders: number } | null;
  finalTest: FinalTest | null;
}

function validate(design: VerdictDesign, counts: VerdictCounts): { twoStage: boolean } {
  if (typeof design !== 'object' || design === null) throw new StatsInputError('design', 'A design with r and n is required.');
  const n = requireCount('n', design.n, 1);
  const r = requireCount('r', design.r);
  if (r >= n) throw new StatsInputError('r', `r (${r}) must be less than n (${n}).`);
  requireOpenUnit('p0', design.p0);
  requireOpenUnit('alpha', design.alpha);
  const twoStage = design.r1 !== null && design.n1 !== null;
  if (twoStage) {
    const n1 = requireCount('n1', design.n1, 1);
    const r1 = requireCount('r1', design.r1);
    if (n1 >= n) throw new StatsInputError('n1', `n1 (${n1}) must be less than n (${n}).`);
    if (r1 >= n1 || r < r1) throw new StatsInputError('r1', `r1 (${r1}) must be less than n1 (${n1}) and at most r (${r}).`);
  }
  if (typeof counts !== 'object' || counts === null) throw new StatsInputError('counts', 'Counts of stage 1 and stage 2 are required.');
  for (const stage of ['stage1', 'stage2'] as const) {
    const c = counts[stage];
    if (typeof c !== 'object' || c === null) throw new StatsInputError(stage, `Counts of ${stage} are required.`);
    for (const key of ['counted', 'decided', 'responders', 'pending'] as const) requireCount(`${stage}.${key}`, c[key]);
    if (c.decided + c.pending !== c.counted) throw new StatsInputError(`${stage}.counted`, `${stage}: decided (${c.decided}) and pending (${c.pending}) must add up to counted (${c.counted}).`);
    if (c.responders > c.decided) throw new StatsInputError(`${stage}.responders`, `${stage}: responders (${c.responders}) cannot exceed decided (${c.decided}).`);
  }
  const stage1Size = twoStage ? (design.n1 as number) : Infinity;
  if (counts.stage1.counted > stage1Size) throw new StatsInputError('stage1.counted', `Stage 1 holds the first n1 = ${stage1Size} counting patients, not ${counts.stage1.counted}.`);
  if (counts.stage2.counted > 0 && counts.stage1.counted < stage1Size) {
    throw new StatsInputError('stage2.counted', 'Stage-2 patients count only once stage 1 holds n1 counting patients.');
  }
  return { twoStage };
}

const SETTLED: Record<'above' | 'at-most', InterimDecision> = { above: 'promising', 'at-most': 'not-promising' };

/** The final rule "more than r among n" with the given counts, as a verdict. */
function finalRuleVerdict(
  look: VerdictLook,
  threshold: Verdict['threshold'],
  attained: Verdict['attained'],
  counts: { responders: number; decided: number; pending: number; counted: number },
  finalTest: FinalTest | null,
): Verdict {
  const settled = settleRule(threshold.r, threshold.n, counts.responders, counts.decided);
  const open = settled.state === 'open';
  return {
    look,
    applied: 'final',
    decision: open ? 'undetermined' : SETTLED[settled.state],
    determinedEarly: settled.early,
    responders: counts.responders,
    decided: counts.decided,
    counted: counts.counted,
    threshold,
    attained,
    atRisk: 0,
    pendingThatCanChange: open ? counts.pending : 0,
    placesLeft: open ? threshold.n - counts.counted : 0,
    toSettle: settled.toSettle,
    finalTest,
  };
}

function singleStage(design: VerdictDesign, counts: VerdictCounts, look: VerdictLook): Verdict {
  const { responders, decided, pending, counted } = counts.stage1;
  const n = look === 'final' ? counted : Math.max(design.n, counted);
  const source = n === design.n ? 'planned' : 'attained';
  const r = source === 'planned' ? design.r : singleStageCutoff(n, design.p0, design.alpha);
  const finalTest: FinalTest | null =
    look === 'final' && decided > 0
      ? { method: 'exact-binomial', pValue: binomialSf(responders - 1, decided, design.p0), n1: decided, m2: 0, alpha: design.alpha, sensitivity: null }
      : null;
  return finalRuleVerdict(look, { r, n, source }, { n1: null, n }, { responders, decided, pending, counted }, finalTest);
}

/** The verdict of the stage-1 rule, with the stage-2 patients it leaves out counted as enrolled at risk. */
function stageOneVerdict(design: VerdictDesign, counts: VerdictCounts, look: VerdictLook, finalTest: FinalTest | null): Verdict {
  const r1 = design.r1 as number;
  const n1 = design.n1 as number;
  const { stage1, stage2 } = counts;
  const settled = settleRule(r1, n1, stage1.responders, stage1.decided);
  let decision: InterimDecision;
  let early = settled.early;
  let toSettle = settled.toSettle;
  let pendingThatCanChange = 0;
  let placesLeft = 0;
  if (settled.state === 'above') {
    decision = stage1.responders > design.r ? 'promising' : 'continue';
  } else if (settled.state === 'at-most') {
    decision = 'stop-futility';
  } else if (look === 'final' && stage1.responders + stage1.pending <= r1) {
    // A final analysis fills no more places: a stage 1 that ended short of n1 without passing r1 is not promising.
    decision = 'not-promising';
    early = stage1.pending > 0;
    toSettle = null;
  } else {
    decision = 'undetermined';
    if (look === 'final') {
      // Passing stage 1 would bring every pending outcome into the final rule.
      pendingThatCanChange = stage1.pending + stage2.pending;
      toSettle = { responders: r1 + 1 - stage1.responders, nonResponders: stage1.responders + stage1.pending - r1 };
    } else {
      pendingThatCanChange = stage1.pending;
      placesLeft = n1 - stage1.counted;
    }
  }
  return {
    look,
    applied: 'stage1',
    decision,
    determinedEarly: early,
    responders: stage1.responders,
    decided: stage1.decided,
    counted: stage1.counted,
    threshold: { r: r1, n: n1, source: 'planned' },
    attained: null,
    // Once stage 2 is under way the interim decision has been taken: its patients were not enrolled at risk.
    atRisk: look === 'stage-2' ? 0 : stage2.counted,
    pendingThatCanChange,
    placesLeft,
    toSettle,
    finalTest,
  };
}

/** The stage-wise p-value over the decided patients, with Koyama & Chen §4 where stage 2 differs from the plan. */
function stageWiseTest(design: VerdictDesign, counts: VerdictCounts): FinalTest | null {
  const { stage1, stage2 } = counts;
  const r1 = design.r1 as number;
  const plannedN1 = design.n1 as number;
  const n1 = stage1.decided;
  const x1 = stage1.responders;
  const stopped = x1 <= r1;
  // No p-value while pending stage-1 outcomes could still pass stage 1, or too few are decided to form a stage 1.
  if (n1 <= r1 || (stopped && x1 + stage1.pending > r1)) return null;
  const m2 = stopped ? 0 : stage2.decided;
  const inference = { r1, n1, r: Math.max(design.r, r1), n: Math.max(design.n, n1 + 1), p0: design.p0 };
  const pValue = stageWisePValue(inference, stopped ? { x1 } : { x1, x2: stage2.responders, n2Actual: m2 });
  let sensitivity: FinalTest['sensitivity'] = null;
  if (!stopped && n1 === plannedN1 && m2 > 0 && m2 !== design.n - plannedN1) {
    const kc = koyamaChenPValue({ r1, n1: plannedN1, r: design.r, n: design.n, p0: design.p0 }, { x1, x2: stage2.responders, m2 });
    sensitivity = { pValue: kc, agrees: kc <= design.alpha === pValue <= design.alpha };
  }
  return { method: 'stage-wise', pValue, n1, m2, alpha: design.alpha, sensitivity };
}

function twoStage(design: VerdictDesign, counts: VerdictCounts, look: VerdictLook): Verdict {
  const r1 = design.r1 as number;
  const n1 = design.n1 as number;
  const n2 = design.n - n1;
  const { stage1, stage2 } = counts;
  const finalTest = look === 'final' ? stageWiseTest(design, counts) : null;
  if (look === 'stage-1' || stage1.responders <= r1) return stageOneVerdict(design, counts, look, finalTest);
  // Stage 1 is passed: the final rule over the attained sizes at a final analysis, over at least the planned ones before it.
  const stage1Size = look === 'final' ? stage1.counted : n1;
  const m2 = look === 'final' ? stage2.counted : Math.max(n2, stage2.counted);
  const source = stage1Size === n1 && m2 === n2 ? 'planned' : 'attained';
  const r = source === 'planned' ? design.r : stageWiseThreshold({ r1, n1: stage1Size, p0: design.p0 }, m2, design.alpha);
  const n = stage1Size + m2;
  const all = {
    responders: stage1.responders + stage2.responders,
    decided: stage1.decided + stage2.decided,
    pending: stage1.pending + stage2.pending,
    counted: stage1.counted + stage2.counted,
  };
  return finalRuleVerdict(look, { r, n, source }, { n1: stage1Size, n }, all, finalTest);
}

export function cohortVerdict(design: VerdictDesign, counts: VerdictCounts, look: VerdictLook): Verdict {
  if (look !== 'stage-1' && look !== 'stage-2' && look !== 'final') throw new StatsInputError('look', `look must be stage-1, stage-2 or final (got ${String(look)}).`);
  return validate(design, counts).twoStage ? twoStage(design, counts, look) : singleStage(design, counts, look);
}
