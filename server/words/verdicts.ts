/**
 * How a verdict reads: the sentence beside it on the Trial overview, the data cut and the report,
 * the rules by which verdicts are reached, and the method notes of the analysis. The verdict itself
 * is computed once, by `cohortVerdict` (server/stats/verdict.ts); these functions only word it.
 */
import type { FinalTest, Verdict } from '../stats/index.js';
import { plural } from './counts.js';

/** The rules every verdict follows, in the order the README and the report state them. */
export const VERDICT_RULES: readonly string[] = [
  'Stage 1 is the first n1 counting patients in enrolment order, everywhere: live evaluation, data cut, report and export. Patients counted beyond n1 before the interim decision are stage-2 patients enrolled at risk: their number is shown and the stage-1 rule leaves them out. No stage-1 threshold is adjusted.',
  'A final analysis keeps the planned n1 and r1. When the attained stage-2 size m2 differs from the planned n2, the verdict is promising exactly when the stage-wise p-value over the attained design (planned n1 and r1, stage 2 of m2) is at most α, and the threshold r′ shown is the one this implies (more than r′ responders exactly when p ≤ α). Koyama & Chen’s (2008) §4 p-value, which keeps the planned design, is shown beside it as a sensitivity figure, with a sentence where the two disagree about p ≤ α. A cohort stopped at stage 1 has no final-size deviation section.',
  'Single-stage designs: interim and final looks use the same threshold for the attained number of patients (the planned r at the planned n, otherwise the exact binomial test’s threshold at α).',
  'A verdict that pending outcomes could still change is “not yet decided”, with the number of pending outcomes that could change it. At a final analysis no patient is said to remain: only pending outcomes can change a verdict.',
  'The predictive probability projects to the attained size at a final analysis. Holm and Benjamini–Hochberg adjustments across cohorts use the stage-wise p-value of a two-stage cohort at its final analysis, and the exact binomial p-value otherwise.',
  'The look: the live evaluation applies the stage-1 rule until the interim decision, the final rule while stage 2 enrols, and is a final analysis once the cohort is in its final analysis, completed or stopped; a data cut is a final analysis when it is frozen as one or when the cohort’s status at the cut is one of those.',
];

/** The method notes of a data cut's analysis that concern verdicts. */
export const VERDICT_METHODS = {
  rule: 'Stage 1: stop for futility when responders ≤ r1 among the first n1 counting patients; final: promising when responders > r among n, where at a final analysis with sizes other than planned r is r′, the threshold the stage-wise p-value over the attained design implies. A rule is determined early once pending outcomes and patients still to enrol cannot change it.',
  inference:
    'After a two-stage design: the primary p-value and 95% interval use the stage-wise ordering over the attained design — the planned n1 and r1 with the attained stage-2 size m2, taken as if m2 had been planned, which is valid when m2 does not depend on the data — with the unbiased estimate (UMVUE, Jung & Kim 2004). With the planned stage 2 this is Koyama & Chen’s (2008) ordering. Where m2 differs from the plan, their §4 p-value, which keeps the planned design and carries stage 2 through a conditional p-value, is a sensitivity figure. The naive estimate and interval ignore the stopping rule and are biased.',
  deviation:
    'When a final look’s sizes differ from the design’s n1 or n: the thresholds the verdict uses — the planned r1 and the threshold r′ that the stage-wise p-value over the attained design implies (the exact binomial test’s for a single-stage design) — with their exact type I error, power, PET0 and EN0 at the attained sizes (binomial). The stage-1 threshold is never adjusted.',
  multiplicity:
    'Each cohort against its own p0: the stage-wise p-value of a two-stage cohort at its final analysis, the exact one-sided binomial p-value otherwise; adjusted p-values by Holm (1979) and Benjamini–Hochberg (1995) across the cohorts with decided outcomes.',
  bayes:
    'Posterior probability P(p > p0 | data) under a Beta(a, b) prior, and the predictive probability that at nmax patients the posterior probability will exceed θT (Lee & Liu 2008); nmax is the planned n (or the patients counted, if more) before the final analysis, and the attained size at it. Default prior: Beta(p0, 1 − p0) — centred on the null rate and worth one patient, so the data dominate; default θT = 0.90.',
};

const p = (v: number) => (v < 0.0001 ? '< 0.0001' : v.toFixed(4));
const responders = (k: number) => plural(k, 'responder');
const more = (k: number, one: string, many: string) => `${k} more ${k === 1 ? one : many}`;

/** "r = 12 among n = 43", or "r′ = 16 for the attained 43 patients". */
function thresholdText(v: Verdict): string {
  const { r, n, source } = v.threshold;
  return source === 'planned' ? `r = ${r} among n = ${n}` : `r′ = ${r} for the attained ${n} patients`;
}

/** Where an attained threshold comes from, as a closing sentence; empty at the planned sizes. */
function thresholdSource(v: Verdict, singleStage: boolean): string {
  if (v.threshold.source === 'planned') return '';
  return singleStage
    ? ` r′ = ${v.threshold.r} is the exact binomial test’s threshold at α for ${v.threshold.n} patients.`
    : ` r′ = ${v.threshold.r} is the threshold the stage-wise p-value over the attained design implies: more than r′ responders exactly when p ≤ α.`;
}

function pValueText(test: FinalTest): string {
  const name = test.method === 'stage-wise' ? 'stage-wise p' : 'exact one-sided p';
  return `${name} = ${p(test.pValue)} ${test.pValue <= test.alpha ? '≤' : '>'} α = ${test.alpha}`;
}

/** What could still change an undecided verdict: "2 pending outcomes and 3 patients still to enrol"; null once settled. */
export function stillOpen(v: Pick<Verdict, 'pendingThatCanChange' | 'placesLeft'>): string | null {
  const parts: string[] = [];
  if (v.pendingThatCanChange > 0) parts.push(plural(v.pendingThatCanChange, 'pending outcome'));
  if (v.placesLeft > 0) parts.push(`${plural(v.placesLeft, 'patient')} still to enrol`);
  return parts.length === 0 ? null : parts.join(' and ');
}

function changeableText(v: Verdict): string {
  const open = stillOpen(v);
  return open === null ? '' : ` Could still change it: ${open}.`;
}

function stageOneSentence(v: Verdict, plannedR: number): string {
  const { r: r1, n: n1 } = v.threshold;
  const possible = v.responders + (n1 - v.decided);
  switch (v.decision) {
    case 'promising':
      return `Stage 1 is passed and the final analysis will be promising whatever the remaining patients show: ${responders(v.responders)} in stage 1 already exceed r = ${plannedR}.`;
    case 'continue':
      return v.determinedEarly
        ? `Stage 1 is passed early: ${responders(v.responders)} among ${v.decided} decided outcomes of stage 1 already exceed r1 = ${r1}, so the futility rule can no longer be met.`
        : `Stage 1 is passed: ${responders(v.responders)} among its ${n1} patients exceed r1 = ${r1}.`;
    case 'stop-futility':
      return v.determinedEarly
        ? `The futility rule is met early: with ${responders(v.responders)} among ${v.decided} decided outcomes of stage 1, at most ${possible} responders are possible among its n1 = ${n1} patients, not more than r1 = ${r1}.`
        : `The futility rule is met: stage 1 ended with ${responders(v.responders)} among its ${n1} patients, not more than r1 = ${r1}.`;
    case 'not-promising':
      return `Not promising: stage 1 ended with ${responders(v.responders)} among ${v.counted} counting patients, short of n1 = ${n1}, without exceeding r1 = ${r1}.`;
    default: {
      const settle = v.toSettle as NonNullable<Verdict['toSettle']>;
      const head = v.look === 'final' ? 'Not yet decided' : 'Stage 1 is not yet decided';
      const negative =
        v.look === 'final' && v.counted < n1
          ? more(settle.nonResponders, 'non-responder leaves', 'non-responders leave') + ' it not promising'
          : more(settle.nonResponders, 'non-responder meets', 'non-responders meet') + ' the futility rule';
      return `${head}: ${responders(v.responders)} among ${v.decided} decided outcomes of stage 1. ${more(settle.responders, 'responder passes', 'responders pass')} stage 1 (more than r1 = ${r1}); ${negative}.${changeableText(v)}`;
    }
  }
}

function finalSentence(v: Verdict, singleStage: boolean): string {
  return finalVerdictSentence(v, singleStage) + thresholdSource(v, singleStage);
}

function finalVerdictSentence(v: Verdict, singleStage: boolean): string {
  const threshold = thresholdText(v);
  const test = v.finalTest && v.look === 'final' && !v.determinedEarly ? `; ${pValueText(v.finalTest)}` : '';
  const name = singleStage ? 'The trial' : 'The final analysis';
  const pending = v.counted - v.decided;
  const left = v.threshold.n - v.decided;
  switch (v.decision) {
    case 'promising':
      if (!v.determinedEarly) return `Promising: ${responders(v.responders)} among ${v.decided} exceed ${threshold}${test}.`;
      return v.look === 'final'
        ? `Promising: ${responders(v.responders)} among ${v.decided} decided already exceed ${threshold}; the ${plural(pending, 'pending outcome')} cannot change that.`
        : `${name} is settled as promising: ${responders(v.responders)} already exceed ${threshold}; ${plural(left, 'patient')} remain to be decided.`;
    case 'not-promising':
      if (!v.determinedEarly) return `Not promising: ${responders(v.responders)} among ${v.decided}, not more than ${threshold}${test}.`;
      return v.look === 'final'
        ? `Not promising: with ${responders(v.responders)} among ${v.decided} decided and ${plural(pending, 'outcome')} pending, at most ${v.responders + pending} responders are possible, not more than ${threshold}.`
        : `${name} is settled as not promising: with ${responders(v.responders)} among ${v.decided} decided, at most ${v.responders + left} responders are possible, not more than ${threshold}.`;
    default: {
      const settle = v.toSettle as NonNullable<Verdict['toSettle']>;
      const ways = `${more(settle.responders, 'responder makes', 'responders make')} it promising (more than ${threshold}); ${more(settle.nonResponders, 'non-responder makes', 'non-responders make')} it not promising.`;
      return v.look === 'final'
        ? `Not yet decided: ${responders(v.responders)} among ${v.decided} decided; ${plural(v.pendingThatCanChange, 'pending outcome')} can still change it. Among them, ${ways}`
        : `${name} is not yet decided: ${responders(v.responders)} among ${v.decided} decided. ${ways[0].toUpperCase()}${ways.slice(1)}${changeableText(v)}`;
    }
  }
}

/** The sentence beside a verdict: what it rests on, and what could still change it. */
export function verdictSentence(v: Verdict, design: { r1: number | null; r: number }): string {
  return v.applied === 'stage1' ? stageOneSentence(v, design.r) : finalSentence(v, design.r1 === null);
}

/** Stage-2 patients enrolled at risk, left out of the stage-1 rule; null when there are none. */
export function atRiskSentence(v: Verdict): string | null {
  if (v.atRisk === 0) return null;
  return `${plural(v.atRisk, 'patient')} counted beyond the first n1 = ${v.threshold.n} ${v.atRisk === 1 ? 'is a stage-2 patient' : 'are stage-2 patients'} enrolled at risk before the interim decision; the stage-1 rule leaves ${v.atRisk === 1 ? 'this patient' : 'them'} out.`;
}

/** What the sensitivity figure is, for a table row or a label. */
export const SENSITIVITY_LABEL = 'Koyama & Chen (2008) §4, planned design kept (sensitivity)';

/** Labels of the figures that go with a verdict, on the Trial overview and the data cut. */
export const VERDICT_FIGURE_LABELS = {
  atRisk: 'Enrolled at risk',
  atRiskHint: 'stage-2 patients left out of the stage-1 rule',
  primaryPValue: { 'stage-wise': 'Stage-wise p (primary)', 'exact-binomial': 'Exact one-sided p' } as const,
  primaryHint: 'the final verdict follows it',
  sensitivity: 'Koyama & Chen §4 p',
  sensitivityHint: 'sensitivity: planned design kept',
  rules: 'How verdicts are reached',
};

/** Said when the primary p-value and the sensitivity figure fall on different sides of α; null when they agree or there is none. */
export function sensitivityDisagreement(test: FinalTest | null): string | null {
  if (!test?.sensitivity || test.sensitivity.agrees) return null;
  return `The primary stage-wise p-value over the attained design (${p(test.pValue)}) and Koyama & Chen’s §4 figure with the planned design kept (${p(test.sensitivity.pValue)}) disagree about p ≤ α = ${test.alpha}. The verdict follows the primary figure; the trial statistician should weigh both.`;
}
