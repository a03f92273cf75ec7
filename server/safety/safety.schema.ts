/**
 * Safety payloads, shared by the server's routes and the client's forms (keep this file free of
 * server-only imports): adverse events (CTCAE v5.0 grade 1–5, attribution to the agent,
 * seriousness, outcome), their corrections, removals and attestations, the import's columns, and
 * the settings of the two stateless safety calculations. An event's onset is judged against the
 * patient's enrolment, so those schemas are built for a patient's enrolment date when there is one.
 */
import { boolean, number, object, string, type InferType } from 'yup';
import { isCalendarDay, latestToday } from '../patients/patients.schema.js';
import { BRYANT_DAY_NMAX_LIMIT } from '../stats/bryant-day.js';
import { TOXICITY_BOUNDARY_NMAX } from '../stats/toxicity-boundary.js';

export { BRYANT_DAY_NMAX_LIMIT, TOXICITY_BOUNDARY_NMAX };

export const CTCAE_GRADES = [1, 2, 3, 4, 5] as const;
/** Attribution to the agent, weakest first: the order the toxicity definition compares against. */
export const ATTRIBUTIONS = ['unrelated', 'unlikely', 'possible', 'probable', 'definite'] as const;
export type Attribution = (typeof ATTRIBUTIONS)[number];
/** Attributions at or above "possible": the ones a toxicity needs. */
export const RELATED_ATTRIBUTIONS: readonly Attribution[] = ['possible', 'probable', 'definite'];
export const EVENT_OUTCOMES = ['recovered', 'recovering', 'not_recovered', 'recovered_with_sequelae', 'fatal', 'unknown'] as const;
export type EventOutcome = (typeof EVENT_OUTCOMES)[number];

/** A cohort's safety rule, locked with its design. */
export const SAFETY_RULES = ['none', 'toxicity_boundary', 'bryant_day'] as const;
export type SafetyRule = (typeof SAFETY_RULES)[number];
export const TOXICITY_STATUSES = ['toxic', 'not_toxic', 'not_assessable'] as const;
export type ToxicityStatus = (typeof TOXICITY_STATUSES)[number];

export const TERM_MAX = 200;
export const EVENT_NOTES_MAX = 2000;
export const EVENT_REASON_MAX = 500;
export const WINDOW_DAYS_MAX = 730;

const emptyToNull = (value: unknown, original: unknown) => (original === '' || original === undefined ? null : value);

function onsetField(enrolledOn?: string) {
  let field = string()
    .trim()
    .matches(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-03.')
    .test('real-date', 'This is not a real calendar date.', (value) => !value || isCalendarDay(value))
    .test('not-future', 'The onset date cannot be in the future.', (value) => !value || value <= latestToday());
  if (enrolledOn) {
    field = field.test('after-enrolment', `The onset cannot be before enrolment (${enrolledOn}).`, (value) => !value || !isCalendarDay(value) || value >= enrolledOn);
  }
  return field;
}

const grade = () =>
  number()
    .transform(emptyToNull)
    .typeError('The grade is a whole number from 1 to 5.')
    .integer('The grade is a whole number from 1 to 5.')
    .min(1, 'The grade is a whole number from 1 to 5.')
    .max(5, 'The grade is a whole number from 1 to 5.')
    .nullable();
const attribution = () => string().transform(emptyToNull).nullable().oneOf([...ATTRIBUTIONS, null], 'Choose unrelated, unlikely, possible, probable or definite.');
const outcome = () => string().oneOf(EVENT_OUTCOMES, 'Choose the outcome of the event.');
const notes = () => string().trim().max(EVENT_NOTES_MAX, `Notes can be at most ${EVENT_NOTES_MAX} characters.`).transform(emptyToNull).nullable();
const term = () => string().trim().max(TERM_MAX, `The term can be at most ${TERM_MAX} characters.`);

/** CTCAE grade 5 is death related to the event: it goes with the outcome "fatal", and only with it. */
function fatalMatchesGrade(value: { grade?: number | null; outcome?: string }): boolean {
  if (value.grade === null || value.grade === undefined || value.outcome === undefined) return true;
  return (value.grade === 5) === (value.outcome === 'fatal');
}
const FATAL_MESSAGE = 'Grade 5 (Death) goes with the outcome "fatal", and a fatal outcome with grade 5.';

export function eventSchema(enrolledOn?: string) {
  return object({
    onsetOn: onsetField(enrolledOn).required('Enter the onset date.'),
    term: term().required('Enter the event as reported (verbatim term).'),
    grade: grade().default(null),
    attribution: attribution().default(null),
    serious: boolean().typeError('Say whether the event is serious.').required('Say whether the event is serious.'),
    outcome: outcome().required('Choose the outcome of the event.'),
    notes: notes().default(null),
  }).test('fatal-grade', FATAL_MESSAGE, (value, ctx) => (fatalMatchesGrade(value) ? true : ctx.createError({ path: 'outcome', message: FATAL_MESSAGE })));
}
export type EventInput = InferType<ReturnType<typeof eventSchema>>;

const version = () => number().typeError('The version must be a number.').integer().min(1).required('The version you edited is missing.');
const reason = () => string().trim().required('Give the reason for the correction.').max(EVENT_REASON_MAX, `The reason can be at most ${EVENT_REASON_MAX} characters.`);

/** A correction names the version it changes and gives a reason; fields left out keep their values. */
export function eventCorrectionSchema(enrolledOn?: string) {
  return object({
    onsetOn: onsetField(enrolledOn).optional(),
    term: term().min(1, 'The term cannot be empty.').optional(),
    grade: grade().optional(),
    attribution: attribution().optional(),
    serious: boolean().typeError('Say whether the event is serious.').optional(),
    outcome: outcome().optional(),
    notes: notes().optional(),
    version: version(),
    reason: reason(),
  });
}
export type EventCorrectionInput = InferType<ReturnType<typeof eventCorrectionSchema>>;

export const eventRemovalSchema = object({ version: version(), reason: reason() });
export const eventAttestationSchema = object({ version: version() });

export const EVENT_LIST_SORTS = ['onsetOn', 'studyId', 'siteCode', 'grade', 'attribution', 'serious'] as const;
export const eventListQuerySchema = object({
  cohortId: string().uuid('Unknown cohort.').optional(),
  siteId: string().uuid('Unknown site.').optional(),
  q: string().trim().max(60).optional(),
  minGrade: number().integer().min(1).max(5).optional(),
  serious: boolean().optional(),
  sort: string().oneOf(EVENT_LIST_SORTS).default('onsetOn'),
  dir: string().oneOf(['asc', 'desc']).default('desc'),
  page: number().integer().min(1).default(1),
  pageSize: number().integer().min(1).max(500).default(50),
});
export type EventListQuery = InferType<typeof eventListQuerySchema>;

/** The CSV import's columns, in the order of the downloadable template. */
export const EVENT_IMPORT_COLUMNS = ['study_id', 'onset_on', 'term', 'grade', 'attribution', 'serious', 'outcome', 'notes', 'correction_reason'] as const;
export const EVENT_IMPORT_MAX_BYTES = 1024 * 1024;
export const EVENT_IMPORT_MAX_ROWS = 5000;

const rate = (label: string) =>
  number()
    .typeError(`${label} must be a number.`)
    .required(`${label} is required.`)
    .moreThan(0, `${label} must be above 0.`)
    .lessThan(1, `${label} must be below 1.`);

/** True unless both numbers are there and the value is not above the other field's. */
const above = (other: string) =>
  function (this: { parent: Record<string, unknown> }, value: number | undefined) {
    const lower = this.parent[other];
    return typeof value !== 'number' || typeof lower !== 'number' || value > lower;
  };

/** The Bryant–Day search's settings (the stateless calculation and the Designs page's form). */
export const safetyDesignSettingsSchema = object({
  pR0: rate('pR0'),
  pR1: rate('pR1').test('above-pR0', 'pR1 must be greater than pR0: the design looks for a better response rate.', above('pR0')),
  toxAcceptable: rate('toxAcceptable'),
  toxUnacceptable: rate('toxUnacceptable').test(
    'above-acceptable',
    'toxUnacceptable must be greater than toxAcceptable.',
    above('toxAcceptable'),
  ),
  alphaR: rate('αR'),
  alphaT: rate('αT'),
  beta: rate('β').test('errors-below-one', 'αR + β and αT + β must be less than 1.', function (value) {
    const { alphaR, alphaT } = this.parent as { alphaR?: unknown; alphaT?: unknown };
    return typeof value !== 'number' || typeof alphaR !== 'number' || typeof alphaT !== 'number' || Math.max(alphaR, alphaT) + value < 1;
  }),
  nmax: number()
    .typeError('nmax must be a number.')
    .required('nmax is required.')
    .integer('nmax must be a whole number.')
    .min(2, 'nmax must be at least 2.')
    .max(
      BRYANT_DAY_NMAX_LIMIT,
      `nmax can be at most ${BRYANT_DAY_NMAX_LIMIT}: the search over Bryant–Day designs is exhaustive, and larger sizes take too long.`,
    ),
});
export type SafetyDesignSettings = InferType<typeof safetyDesignSettingsSchema>;

/** The continuous toxicity boundary's settings: the maximum n, the acceptable rate θ and the overall α. */
export const toxicityBoundarySchema = object({
  n: number()
    .typeError('n must be a number.')
    .required('n is required.')
    .integer('n must be a whole number.')
    .min(1, 'n must be at least 1.')
    .max(TOXICITY_BOUNDARY_NMAX, `n can be at most ${TOXICITY_BOUNDARY_NMAX}, the largest toxicity boundary offered.`),
  theta: rate('θ'),
  alpha: rate('α'),
});
export type ToxicityBoundarySettings = InferType<typeof toxicityBoundarySchema>;

const count = (label: string) => number().typeError(`${label} must be a number.`).required(`${label} is required.`).integer(`${label} must be a whole number.`).min(0, `${label} cannot be negative.`);

/** A Bryant–Day design and its four rates, for its characteristics (grid and association). */
export const bryantDayCharacteristicsSchema = object({
  n1: count('n1').min(1, 'n1 must be at least 1.'),
  r1: count('r1'),
  t1: count('t1'),
  n: count('n').max(BRYANT_DAY_NMAX_LIMIT, `n can be at most ${BRYANT_DAY_NMAX_LIMIT}.`),
  r: count('r'),
  t: count('t'),
  pR0: rate('pR0'),
  pR1: rate('pR1'),
  toxAcceptable: rate('toxAcceptable'),
  toxUnacceptable: rate('toxUnacceptable'),
});
export type BryantDayCharacteristicsInput = InferType<typeof bryantDayCharacteristicsSchema>;

/** The protocol's toxicity definition as the design form sets it. */
export const toxicityDefinitionFields = {
  toxMinGrade: number().typeError('Choose the lowest grade that counts.').integer().min(1, 'Choose a grade from 1 to 5.').max(5, 'Choose a grade from 1 to 5.'),
  toxWindowDays: number()
    .typeError('The window is a number of days.')
    .integer('The window is a whole number of days.')
    .min(1, 'The window is at least 1 day.')
    .max(WINDOW_DAYS_MAX, `The window is at most ${WINDOW_DAYS_MAX} days.`),
};

/** Patients of a cohort by toxicity status under its definition (the live state's counts). */
export type SafetyCounts = {
  enrolled: number;
  toxic: number;
  notToxic: number;
  notAssessable: number;
  /** Not assessable only because an event in the window awaits its grade or attribution. */
  awaitingAssessment: number;
  /** The same among stage-1 patients (the Bryant–Day stage-1 limit counts these). */
  stage1: { enrolled: number; toxic: number; notToxic: number };
};

/** Where a cohort stands against its safety rule: numbers and states, worded by server/words. */
export type SafetyRuleState =
  | {
      rule: 'toxicity_boundary';
      toxicities: number;
      assessable: number;
      n: number;
      /** b_k at the assessable patients so far (b_n beyond n); null while no stop is possible yet. */
      bound: number | null;
      crossed: boolean;
      /** Further toxicities in a row among the next assessable patients that would reach the boundary; 0 once crossed, null when it cannot be reached within n. */
      toNextStop: number | null;
      beyondN: boolean;
    }
  | {
      rule: 'bryant_day';
      toxicities: number;
      assessable: number;
      stage1Toxicities: number;
      stage1Assessable: number;
      n1: number;
      t1: number;
      n: number;
      t: number;
      /** More than t1 toxicities among stage-1 patients: the stage-1 toxicity limit is crossed. */
      crossed: boolean;
      /** Further stage-1 toxicities that would cross the stage-1 limit (0 once crossed). */
      toStage1Limit: number;
      /** More than t toxicities in all: the final toxicity rule can no longer be met. */
      finalLimitExceeded: boolean;
    };

/** Where a Bryant–Day cohort stands on response and toxicity together (worded by server/words). */
export type JointVerdict = {
  verdict: 'stop_toxicity_stage1' | 'stop_response_stage1' | 'promising' | 'not_promising_response' | 'not_promising_toxicity' | 'stage1_open' | 'stage2_open';
  r1: number;
  n1: number;
  t1: number;
  r: number;
  n: number;
  t: number;
  stage1: { responses: number; decided: number; toxicities: number; assessable: number };
  final: { responses: number; decided: number; toxicities: number; assessable: number };
};
