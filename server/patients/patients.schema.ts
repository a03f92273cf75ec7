/**
 * Patient payloads, shared by the server's routes and the client's forms (keep this file free of
 * server-only imports). The rules: a study ID is the site code, a dash and a number; dates are
 * real calendar days, never in the future; a responder's best overall response is CR or PR and a
 * non-responder's SD, PD or NE (RECIST 1.1); a patient who is not evaluable has a reason.
 */
import * as yup from 'yup';

export const OUTCOMES = ['pending', 'responder', 'non_responder'] as const;
export type Outcome = (typeof OUTCOMES)[number];
export const RESPONSES = ['CR', 'PR', 'SD', 'PD', 'NE'] as const;
export type BestOverallResponse = (typeof RESPONSES)[number];

export const RESPONSES_FOR: Record<Outcome, readonly BestOverallResponse[]> = {
  pending: [],
  responder: ['CR', 'PR'],
  non_responder: ['SD', 'PD', 'NE'],
};

export const STUDY_ID_PATTERN = /^[A-Z0-9]{2,8}-\d{1,6}$/;
const ISO_DAY = /^\d{4}-\d{2}-\d{2}$/;
const TEXT_MAX = 500;

/**
 * The latest calendar day anywhere on Earth (UTC+14): a site far east of the server may already be
 * a day ahead, and its "today" is not in the future.
 */
export function latestToday(now = new Date()): string {
  return new Date(now.getTime() + 14 * 3600 * 1000).toISOString().slice(0, 10);
}

export function isCalendarDay(value: string): boolean {
  if (!ISO_DAY.test(value)) return false;
  const date = new Date(`${value}T00:00:00Z`);
  return !Number.isNaN(date.getTime()) && date.toISOString().slice(0, 10) === value;
}

const day = (label: string) =>
  yup
    .string()
    .trim()
    .test('calendar-day', `${label} must be a real date (YYYY-MM-DD).`, (v) => v === undefined || v === null || v === '' || isCalendarDay(v))
    .test('not-future', `${label} cannot be in the future.`, (v) => !v || !isCalendarDay(v) || v <= latestToday());

export const enrolSchema = yup.object({
  studyId: yup
    .string()
    .trim()
    .uppercase()
    .required('Study ID is required.')
    .matches(STUDY_ID_PATTERN, 'Study ID is the site code, a dash and a number, e.g. RVG-014.'),
  siteId: yup.string().required('Choose the site.'),
  cohortId: yup.string().nullable().default(null),
  enrolledOn: day('Enrolment date').required('Enrolment date is required.'),
});
export type EnrolInput = yup.InferType<typeof enrolSchema>;

export const outcomeSchema = yup.object({
  version: yup.number().integer().min(1).required('The record version is required.'),
  outcome: yup.string().oneOf(OUTCOMES, 'Outcome is pending, responder or non-responder.').required('Outcome is required.'),
  bestOverallResponse: yup
    .string()
    .nullable()
    .default(null)
    .transform((v) => (v === '' ? null : v))
    .oneOf([...RESPONSES, null], 'Best overall response is CR, PR, SD, PD or NE.')
    .when('outcome', ([outcome], s) =>
      outcome === 'pending'
        ? s.test('none-when-pending', 'A pending outcome has no best overall response yet.', (v) => v === null)
        : s
            .required('Best overall response is required once the outcome is known.')
            .test('matches-outcome', (v, ctx) =>
              v && !RESPONSES_FOR[outcome as Outcome]?.includes(v)
                ? ctx.createError({
                    message: outcome === 'responder' ? 'A responder’s best overall response is CR or PR.' : 'A non-responder’s best overall response is SD, PD or NE.',
                  })
                : true,
            ),
    ),
  responseAssessedOn: day('Assessment date')
    .nullable()
    .default(null)
    .transform((v) => (v === '' ? null : v))
    .when('outcome', ([outcome], s) =>
      outcome === 'pending'
        ? s.test('none-when-pending', 'A pending outcome has no assessment date yet.', (v) => v === null)
        : s.required('The date of the response assessment is required once the outcome is known.'),
    )
    // The form passes the enrolment date as context; the server checks it against the stored record.
    .test('after-enrolment', 'The assessment cannot be before enrolment.', (v, ctx) => {
      const enrolledOn = (ctx.options.context as { enrolledOn?: string } | undefined)?.enrolledOn;
      return !v || !enrolledOn || v >= enrolledOn;
    }),
  evaluable: yup.boolean().required('Say whether the patient is evaluable.'),
  notEvaluableReason: yup
    .string()
    .trim()
    .max(TEXT_MAX, `Keep the reason under ${TEXT_MAX} characters.`)
    .nullable()
    .default(null)
    .transform((v) => (v === '' ? null : v))
    .when('evaluable', ([evaluable], s) =>
      evaluable === false
        ? s.required('Give the reason the patient is not evaluable.')
        : s.test('none-when-evaluable', 'Only a patient who is not evaluable has a reason.', (v) => v === null),
    ),
  reason: yup
    .string()
    .trim()
    .max(TEXT_MAX, `Keep the reason under ${TEXT_MAX} characters.`)
    .nullable()
    .default(null)
    .transform((v) => (v === '' ? null : v)),
});
export type OutcomeInput = yup.InferType<typeof outcomeSchema>;

export const attestationSchema = yup.object({
  version: yup.number().integer().min(1).required('The record version is required.'),
});

/** The one wording of an attestation's signature: shown before signing, recorded with the signature. */
export const attestationMeaning = (studyId: string) => `I attest that the outcome recorded for ${studyId} is accurate and complete.`;

/** The fields of an outcome, compared to decide whether a change is a correction. */
export const OUTCOME_FIELDS = ['outcome', 'bestOverallResponse', 'responseAssessedOn', 'evaluable', 'notEvaluableReason'] as const;

/** A recorded outcome is any one beyond the untouched default (pending, evaluable, no date). */
export function isRecorded(p: { outcome: string; bestOverallResponse: string | null; responseAssessedOn: string | null; evaluable: boolean; notEvaluableReason: string | null }): boolean {
  return p.outcome !== 'pending' || p.bestOverallResponse !== null || p.responseAssessedOn !== null || !p.evaluable || p.notEvaluableReason !== null;
}

export const LIST_SORTS = ['studyId', 'siteCode', 'cohortCode', 'stage', 'enrolledOn', 'outcome', 'bestOverallResponse', 'responseAssessedOn'] as const;
export const LIST_STATUSES = ['evaluable', 'not_evaluable', 'attested', 'not_attested', 'flagged'] as const;

export const listQuerySchema = yup.object({
  siteId: yup.string().uuid('Unknown site.').optional(),
  cohortId: yup.string().uuid('Unknown cohort.').optional(),
  outcome: yup.string().oneOf(OUTCOMES).optional(),
  status: yup.string().oneOf(LIST_STATUSES).optional(),
  stage: yup.number().integer().oneOf([1, 2]).optional(),
  q: yup.string().trim().max(40).optional(),
  sort: yup.string().oneOf(LIST_SORTS).default('studyId'),
  dir: yup.string().oneOf(['asc', 'desc']).default('asc'),
  page: yup.number().integer().min(1).max(10_000_000, 'Page must be at most 10,000,000.').default(1),
  pageSize: yup.number().integer().min(1).max(500).default(50),
});
export type ListQuery = yup.InferType<typeof listQuerySchema>;

/** The columns of the CSV import, in the order of the downloadable template. */
export const IMPORT_COLUMNS = [
  'study_id',
  'site_code',
  'cohort_code',
  'enrolled_on',
  'outcome',
  'best_overall_response',
  'response_assessed_on',
  'evaluable',
  'not_evaluable_reason',
  'correction_reason',
] as const;
export const IMPORT_MAX_BYTES = 1024 * 1024;
export const IMPORT_MAX_ROWS = 2000;
