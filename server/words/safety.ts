/**
 * How adverse events, the protocol's toxicity definition and the safety rules read to a person.
 * Grade words are the general grade descriptions of the NCI Common Terminology Criteria for Adverse
 * Events (CTCAE) v5.0.
 */
import type { Attribution, EventOutcome, JointVerdict, SafetyRule, SafetyRuleState, ToxicityStatus } from '../safety/safety.schema.js';
import { plural } from './counts.js';
import { GLYPHS, type Worded } from './glyphs.js';

/** NCI CTCAE v5.0, general grade descriptions (short form). */
export const GRADE_WORDS: Record<number, string> = {
  1: 'Mild',
  2: 'Moderate',
  3: 'Severe',
  4: 'Life-threatening',
  5: 'Death',
};

export const CTCAE_SOURCE = 'NCI Common Terminology Criteria for Adverse Events (CTCAE) v5.0';

/** "Grade 3 (Severe)"; "not graded yet" for a missing grade. */
export const gradeText = (grade: number | null) => (grade === null ? 'not graded yet' : `grade ${grade} (${GRADE_WORDS[grade]})`);

export const ATTRIBUTION_WORDS: Record<Attribution, string> = {
  unrelated: 'Unrelated',
  unlikely: 'Unlikely related',
  possible: 'Possibly related',
  probable: 'Probably related',
  definite: 'Definitely related',
};

export const attributionText = (attribution: Attribution | null) => (attribution === null ? 'attribution not assessed yet' : ATTRIBUTION_WORDS[attribution].toLowerCase());

export const EVENT_OUTCOME_WORDS: Record<EventOutcome, string> = {
  recovered: 'Recovered',
  recovering: 'Recovering',
  not_recovered: 'Not recovered',
  recovered_with_sequelae: 'Recovered with sequelae',
  fatal: 'Fatal',
  unknown: 'Unknown',
};

export const SAFETY_RULE_WORDS: Record<SafetyRule, string> = {
  none: 'Response only',
  toxicity_boundary: 'Response with a continuous toxicity boundary',
  bryant_day: 'Bryant–Day: response and toxicity together',
};

export const TOXICITY_STATUS_WORDS: Record<ToxicityStatus, string> = {
  toxic: 'Toxicity',
  not_toxic: 'No toxicity',
  not_assessable: 'Not yet assessable',
};

/** The protocol's definition of a toxicity in one sentence; enrolment stands for the first dose. */
export function toxicityDefinitionSentence(definition: { minGrade: number; windowDays: number }): string {
  const grade = definition.minGrade === 5 ? 'of CTCAE grade 5 (Death)' : `of CTCAE grade ${definition.minGrade} (${GRADE_WORDS[definition.minGrade]}) or higher`;
  return `A toxicity is an adverse event ${grade}, possibly, probably or definitely related to the agent, with onset within ${definition.windowDays} days of enrolment (enrolment stands for the first dose).`;
}

/** Why a cohort's accrual is paused, without figures: the cohort's status is read by everyone on the trial. */
export function safetyPauseReason(rule: 'toxicity_boundary' | 'bryant_day'): string {
  return rule === 'bryant_day'
    ? 'The stage-1 toxicity limit of the locked Bryant–Day design was crossed.'
    : 'The continuous toxicity boundary of the locked design was reached.';
}

/** What a crossing was, with its figures, for the statisticians and the committee. */
export function crossingSentence(state: SafetyRuleState): string {
  if (state.rule === 'bryant_day') {
    return `${plural(state.stage1Toxicities, 'toxicity', 'toxicities')} among the stage-1 patients: more than the stage-1 limit t1 = ${state.t1}.`;
  }
  return `${plural(state.toxicities, 'toxicity', 'toxicities')} among ${plural(state.assessable, 'assessable patient')}: at or above the boundary b = ${state.bound}.`;
}

/** Where a cohort stands against its safety rule, in sentences for the overview, mail and report. */
export function describeSafetyState(state: SafetyRuleState): string[] {
  if (state.rule === 'bryant_day') {
    const stage1 = state.crossed
      ? `Stage-1 toxicity limit crossed: ${plural(state.stage1Toxicities, 'toxicity', 'toxicities')} among the stage-1 patients, more than t1 = ${state.t1}.`
      : `${plural(state.stage1Toxicities, 'toxicity', 'toxicities')} among the stage-1 patients so far (${state.stage1Assessable} of n1 = ${state.n1} assessable); the cohort stops after stage 1 with more than t1 = ${state.t1}, so ${plural(state.toStage1Limit, 'more toxicity', 'more toxicities')} would cross the limit.`;
    const final = state.finalLimitExceeded
      ? `More than t = ${state.t} toxicities in all (${state.toxicities}): the final toxicity rule of the design can no longer be met.`
      : `Final toxicity rule: at most t = ${state.t} toxicities among n = ${state.n} patients; ${state.toxicities} so far.`;
    return [stage1, final];
  }
  const sentences: string[] = [];
  if (state.crossed) {
    sentences.push(`Boundary reached: ${plural(state.toxicities, 'toxicity', 'toxicities')} among ${plural(state.assessable, 'assessable patient')}, at or above the boundary b = ${state.bound}.`);
  } else if (state.bound === null) {
    sentences.push(`${plural(state.toxicities, 'toxicity', 'toxicities')} among ${plural(state.assessable, 'assessable patient')}: no stop is possible yet at this number of patients.`);
  } else {
    sentences.push(`${plural(state.toxicities, 'toxicity', 'toxicities')} among ${plural(state.assessable, 'assessable patient')}; the boundary there is ${state.bound}.`);
  }
  if (!state.crossed) {
    sentences.push(
      state.toNextStop === null
        ? `The boundary can no longer be reached within its n = ${state.n} patients.`
        : `${plural(state.toNextStop, 'more toxicity', 'more toxicities')} in a row among the next assessable patients would reach it.`,
    );
  }
  if (state.beyondN) sentences.push(`More patients are assessable than the boundary's n = ${state.n}: its last value applies.`);
  return sentences;
}

export const SAFETY_PAUSED = 'Accrual paused for a safety review';

export type { JointVerdict };

/** A Bryant–Day cohort's response and toxicity read together at a data cut. */
export function describeJointVerdict(v: JointVerdict): string[] {
  const stage1 = `Stage 1: ${plural(v.stage1.responses, 'response')} among ${v.stage1.decided} decided and ${plural(v.stage1.toxicities, 'toxicity', 'toxicities')} among ${v.stage1.assessable} assessable of n1 = ${v.n1} (stop with at most r1 = ${v.r1} responses or more than t1 = ${v.t1} toxicities).`;
  const final = `In all: ${plural(v.final.responses, 'response')} among ${v.final.decided} decided and ${plural(v.final.toxicities, 'toxicity', 'toxicities')} among ${v.final.assessable} assessable of n = ${v.n} (promising with more than r = ${v.r} responses and at most t = ${v.t} toxicities).`;
  const verdict: Record<JointVerdict['verdict'], string> = {
    stop_toxicity_stage1: 'Joint verdict: stop after stage 1 — the stage-1 toxicity limit is crossed.',
    stop_response_stage1: 'Joint verdict: stop after stage 1 — too few responses.',
    promising: 'Joint verdict: promising — enough responses with acceptable toxicity.',
    not_promising_response: 'Joint verdict: not promising — too few responses at n.',
    not_promising_toxicity: 'Joint verdict: not promising — too many toxicities at n.',
    stage1_open: 'Joint verdict: open — stage 1 is not complete yet.',
    stage2_open: 'Joint verdict: open — stage 1 passed; stage 2 is not complete yet.',
  };
  return [verdict[v.verdict], stage1, final];
}

/** A data cut frozen before adverse events were frozen with cuts. */
export const frozenEventsMissing = () => 'This data cut was frozen before adverse events were frozen with data cuts: it has no safety section.';

/** A cohort with no toxicity rule at the cut. */
export const responseOnlySafety = (hasDesign: boolean) =>
  hasDesign ? 'The locked design monitors response only: adverse events are listed, and no toxicity rule is applied.' : 'No locked design at the cut: no toxicity rule is applied.';

/** Needs attention: an event that cannot be judged against the toxicity definition yet. */
export function eventAwaitsAssessment(event: { term: string; onsetOn: string; gradeMissing: boolean; attributionMissing: boolean }): string {
  const missing = event.gradeMissing && event.attributionMissing ? 'its grade and attribution' : event.gradeMissing ? 'its grade' : 'its attribution';
  return `The ${event.term} with onset on ${event.onsetOn} still needs ${missing}.`;
}

/** Needs attention: a serious event the site investigator has not attested. */
export const seriousEventUnattested = (event: { term: string; onsetOn: string }) => `The serious event ${event.term} with onset on ${event.onsetOn} is not attested by the site investigator yet.`;

/** Needs attention: a toxicity window that closes soon with no event counting yet. */
export function toxicityWindowClosing(lastDay: string, today: string): string {
  const days = Math.round((Date.parse(`${lastDay}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / 86_400_000);
  const when = days === 0 ? 'today' : days === 1 ? 'tomorrow' : `in ${days} days, on ${lastDay}`;
  return `The toxicity window closes ${when}: record any adverse event with onset in the window before it is judged.`;
}

export const SAFETY_ATTENTION_WORDS: Record<'event-awaits-assessment' | 'serious-event-unattested' | 'toxicity-window-closing', Worded> = {
  'event-awaits-assessment': { label: 'Event without grade or attribution', glyph: GLYPHS.pending },
  'serious-event-unattested': { label: 'Serious event not attested', glyph: GLYPHS.draft },
  'toxicity-window-closing': { label: 'Toxicity window closing', glyph: GLYPHS.warning },
};
