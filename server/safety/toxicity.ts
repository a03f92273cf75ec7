/**
 * The protocol's toxicity definition applied to one patient, and a cohort's counts against its
 * safety rule. Pure: dates and numbers in, states and sentences out, so the live state, the write
 * that may cross a rule and the tests share them.
 *
 * A toxicity is an adverse event of CTCAE grade at or above the protocol's threshold, attributed to
 * the agent as possible, probable or definite, with onset within the protocol's window of days from
 * enrolment (enrolment stands for the first dose; the last day of the window is enrolment + window).
 * A patient is
 * - toxic as soon as one event meets the definition;
 * - not toxic once the window has closed and no event in it meets the definition or could still
 *   meet it;
 * - not yet assessable while the window is open, or while an event in the window awaits its grade
 *   or attribution and would count with the right one.
 * The live counts come from SQL (safety.repository.ts) and must agree with `deriveToxicity`.
 */
import { addDays, format, parseISO } from 'date-fns';
import { proportionInterval } from '../stats/index.js';
import { attributionText, gradeText, GRADE_WORDS, toxicityDefinitionSentence } from '../words/index.js';
import { RELATED_ATTRIBUTIONS, type Attribution, type SafetyCounts, type SafetyRuleState, type ToxicityStatus } from './safety.schema.js';

export type ToxicityDefinition = { minGrade: number; windowDays: number };

export type EventForToxicity = { id?: string; onsetOn: string; term: string; grade: number | null; attribution: Attribution | null };

export type ToxicityDerivation = {
  status: ToxicityStatus;
  /** The last day an event's onset counts. */
  windowEndsOn: string;
  /** The first event (by onset) that meets the definition. */
  qualifyingEventId: string | null;
  /** Events in the window that would count once graded or attributed. */
  awaitingEventIds: string[];
  /** Not assessable only because such an event awaits its grade or attribution. */
  awaitsAssessment: boolean;
  explanation: string[];
};

export const windowEnd = (enrolledOn: string, windowDays: number) => format(addDays(parseISO(enrolledOn), windowDays), 'yyyy-MM-dd');
const longDate = (iso: string) => format(parseISO(iso), 'd MMMM yyyy');

const related = (attribution: Attribution | null) => attribution !== null && RELATED_ATTRIBUTIONS.includes(attribution);

type Judged = { event: EventForToxicity; kind: 'qualifies' | 'awaiting' | 'outside' | 'below' };

function judge(event: EventForToxicity, definition: ToxicityDefinition, enrolledOn: string, lastDay: string): Judged {
  if (event.onsetOn < enrolledOn || event.onsetOn > lastDay) return { event, kind: 'outside' };
  const gradeOk = event.grade === null || event.grade >= definition.minGrade;
  const attributionOk = event.attribution === null || related(event.attribution);
  if (!gradeOk || !attributionOk) return { event, kind: 'below' };
  return { event, kind: event.grade === null || event.attribution === null ? 'awaiting' : 'qualifies' };
}

function eventName(event: EventForToxicity): string {
  return `${event.term} with onset on ${longDate(event.onsetOn)}`;
}

function whyNot(judged: Judged, definition: ToxicityDefinition, lastDay: string): string {
  const { event } = judged;
  if (judged.kind === 'outside') return `The ${eventName(event)} does not count: its onset is after the window closed on ${longDate(lastDay)}.`;
  if (judged.kind === 'awaiting') {
    const missing = event.grade === null && event.attribution === null ? 'its grade and attribution are' : event.grade === null ? 'its grade is' : 'its attribution is';
    return `The ${eventName(event)} would count if it is grade ${definition.minGrade} or higher and at least possibly related: ${missing} not recorded yet.`;
  }
  if (event.grade !== null && event.grade < definition.minGrade) {
    return `The ${eventName(event)} does not count: ${gradeText(event.grade)} is below grade ${definition.minGrade} (${GRADE_WORDS[definition.minGrade]}).`;
  }
  return `The ${eventName(event)} does not count: it is ${attributionText(event.attribution)} to the agent.`;
}

/** One patient's toxicity status under the definition, with the reasons in sentences. */
export function deriveToxicity(input: { enrolledOn: string; events: EventForToxicity[]; definition: ToxicityDefinition; today: string }): ToxicityDerivation {
  const { enrolledOn, definition, today } = input;
  const lastDay = windowEnd(enrolledOn, definition.windowDays);
  const judged = [...input.events].sort((a, b) => (a.onsetOn < b.onsetOn ? -1 : a.onsetOn > b.onsetOn ? 1 : 0)).map((e) => judge(e, definition, enrolledOn, lastDay));
  const qualifying = judged.filter((j) => j.kind === 'qualifies');
  const awaiting = judged.filter((j) => j.kind === 'awaiting');
  const windowOpen = today <= lastDay;
  const status: ToxicityStatus = qualifying.length > 0 ? 'toxic' : awaiting.length > 0 || windowOpen ? 'not_assessable' : 'not_toxic';

  const explanation = [toxicityDefinitionSentence(definition), `Enrolled on ${longDate(enrolledOn)}, so the window runs to ${longDate(lastDay)}${windowOpen ? ' and is still open' : ''}.`];
  if (status === 'toxic') {
    const first = qualifying[0].event;
    const more = qualifying.length - 1;
    explanation.push(
      `Toxicity: the ${eventName(first)} (${gradeText(first.grade)}, ${attributionText(first.attribution)}) meets the definition${more > 0 ? `; ${more === 1 ? '1 more event in the window meets' : `${more} more events in the window meet`} it too` : ''}.`,
    );
  }
  for (const j of judged) if (j.kind !== 'qualifies') explanation.push(whyNot(j, definition, lastDay));
  if (status === 'not_toxic') explanation.push(`No toxicity: the window closed on ${longDate(lastDay)} without an event that meets the definition.`);
  if (status === 'not_assessable') {
    explanation.push(
      awaiting.length > 0
        ? 'Not yet assessable: an event in the window awaits its grade or attribution.'
        : `Not yet assessable: the window is open until ${longDate(lastDay)}; an event with onset by then may still count.`,
    );
  }
  return {
    status,
    windowEndsOn: lastDay,
    qualifyingEventId: qualifying[0]?.event.id ?? null,
    awaitingEventIds: awaiting.map((j) => j.event.id).filter((id): id is string => id !== undefined),
    awaitsAssessment: status === 'not_assessable' && awaiting.length > 0,
    explanation,
  };
}

/** A cohort's tally from each patient's derivation (the reference the SQL counts are compared against). */
export function countToxicities(patients: Array<{ stage: 1 | 2; derivation: Pick<ToxicityDerivation, 'status' | 'awaitsAssessment'> }>): SafetyCounts {
  const counts: SafetyCounts = { enrolled: 0, toxic: 0, notToxic: 0, notAssessable: 0, awaitingAssessment: 0, stage1: { enrolled: 0, toxic: 0, notToxic: 0 } };
  for (const { stage, derivation } of patients) {
    counts.enrolled += 1;
    if (derivation.status === 'toxic') counts.toxic += 1;
    else if (derivation.status === 'not_toxic') counts.notToxic += 1;
    else counts.notAssessable += 1;
    if (derivation.awaitsAssessment) counts.awaitingAssessment += 1;
    if (stage === 1) {
      counts.stage1.enrolled += 1;
      if (derivation.status === 'toxic') counts.stage1.toxic += 1;
      if (derivation.status === 'not_toxic') counts.stage1.notToxic += 1;
    }
  }
  return counts;
}

/** The rule a design version locks, as the state needs it. */
export type SafetyRuleOfDesign =
  | { rule: 'toxicity_boundary'; bounds: Array<number | null> }
  | { rule: 'bryant_day'; n1: number; t1: number; n: number; t: number };

/**
 * Further toxicities in a row, among the next assessable patients, that would reach the boundary:
 * the least m ≥ 1 with y + m ≥ b_(k + m), or null when none within n.
 */
function toxicitiesToBoundary(bounds: Array<number | null>, k: number, y: number): number | null {
  for (let m = 1; k + m <= bounds.length; m += 1) {
    const b = bounds[k + m - 1];
    if (b !== null && y + m >= b) return m;
  }
  return null;
}

/**
 * Where the counts stand against the rule. The continuous boundary is applied at the assessable
 * patients so far (k): crossed when the toxicities reach b_k. Past n, b_n applies. Bryant–Day's
 * stage-1 limit: crossed when more than t1 stage-1 patients are toxic.
 */
export function safetyRuleState(rule: SafetyRuleOfDesign, counts: SafetyCounts): SafetyRuleState {
  const toxicities = counts.toxic;
  const assessable = counts.toxic + counts.notToxic;
  if (rule.rule === 'bryant_day') {
    const stage1Toxicities = counts.stage1.toxic;
    return {
      rule: 'bryant_day',
      toxicities,
      assessable,
      stage1Toxicities,
      stage1Assessable: counts.stage1.toxic + counts.stage1.notToxic,
      n1: rule.n1,
      t1: rule.t1,
      n: rule.n,
      t: rule.t,
      crossed: stage1Toxicities > rule.t1,
      toStage1Limit: Math.max(0, rule.t1 + 1 - stage1Toxicities),
      finalLimitExceeded: toxicities > rule.t,
    };
  }
  const n = rule.bounds.length;
  const beyondN = assessable > n;
  const k = Math.min(assessable, n);
  const bound = k === 0 ? null : rule.bounds[k - 1];
  const crossed = bound !== null && toxicities >= bound;
  return {
    rule: 'toxicity_boundary',
    toxicities,
    assessable,
    n,
    bound,
    crossed,
    toNextStop: crossed ? 0 : beyondN ? null : toxicitiesToBoundary(rule.bounds, k, toxicities),
    beyondN,
  };
}

export const SAFETY_CONF_LEVEL = 0.95;

export type ToxicityRate = { toxicities: number; assessable: number; estimate: number; ci: [number, number]; confLevel: number; method: 'clopper-pearson' };

/** Toxicities among assessable patients with the exact (Clopper–Pearson) interval; null before any patient is assessable. */
export function toxicityRate(counts: Pick<SafetyCounts, 'toxic' | 'notToxic'>): ToxicityRate | null {
  const assessable = counts.toxic + counts.notToxic;
  if (assessable === 0) return null;
  return {
    toxicities: counts.toxic,
    assessable,
    estimate: counts.toxic / assessable,
    ci: proportionInterval(counts.toxic, assessable, { method: 'clopper-pearson', confLevel: SAFETY_CONF_LEVEL }),
    confLevel: SAFETY_CONF_LEVEL,
    method: 'clopper-pearson',
  };
}
