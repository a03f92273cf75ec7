/**
 * A stored value as a person reads it, where a change history shows before and after: a code of a
 * known field (a status, an outcome, a role …) in its words. Other values are left as they are.
 */
import { DECISION_WORDS, RECOMMENDATION_WORDS } from './decisions.js';
import { INTERIM_ACCRUAL_LABELS, NE_BETWEEN_RESPONSES_LABELS, OUTCOME_SOURCE_LABELS, POPULATION_LABELS, SELECTION_LABELS } from './designs.js';
import { OUTCOME_WORDS } from './outcomes.js';
import { ROLE_LABELS } from './people.js';
import { STATUS_WORDS, STOP_CATEGORY_LABELS } from './trial-life.js';
import { CUT_KIND_LABELS } from './data-cuts.js';

const labels = (words: Record<string, { label: string }>) => Object.fromEntries(Object.entries(words).map(([code, w]) => [code, w.label]));

const statuses = labels(STATUS_WORDS);

/** The fields whose values are codes, and the words of each code. */
const FIELD_WORDS: Record<string, Record<string, string>> = {
  status: statuses,
  cohortStatus: statuses,
  fromStatus: statuses,
  toStatus: statuses,
  outcome: labels(OUTCOME_WORDS),
  decision: labels(RECOMMENDATION_WORDS),
  recommendation: labels(RECOMMENDATION_WORDS),
  action: labels(DECISION_WORDS),
  stopCategory: STOP_CATEGORY_LABELS,
  role: ROLE_LABELS,
  analysisPopulation: POPULATION_LABELS,
  interimAccrual: INTERIM_ACCRUAL_LABELS,
  outcomeSource: OUTCOME_SOURCE_LABELS,
  neBetweenResponses: NE_BETWEEN_RESPONSES_LABELS,
  selection: SELECTION_LABELS,
  kind: CUT_KIND_LABELS,
};

/** The words of `value` stored under `field`, or the value itself when it is not one of that field's codes. */
export function storedValueWords(field: string, value: string): string {
  return FIELD_WORDS[field]?.[value] ?? value;
}

/** A list of stored codes, such as the recommendations behind a decision, in words. */
export function storedValuesWords(field: string, values: readonly string[]): string {
  const single = field.endsWith('s') ? field.slice(0, -1) : field;
  return values.map((value) => storedValueWords(single, value)).join(', ');
}
