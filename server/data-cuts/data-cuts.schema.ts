/**
 * Payloads of the data-cut routes, shared by the server's validation and the client's forms.
 * Kept free of server-only imports: the client imports this file directly.
 */
import { number, object, string, type InferType } from 'yup';
import { STOP_CATEGORIES } from '../trials/trials.schema.js';

// Kept for the client, which imports the stop categories from here; they live in trials.schema.ts.
export { STOP_CATEGORIES };

export const CUT_KINDS = ['interim', 'final'] as const;

export type CutKind = (typeof CUT_KINDS)[number];

/** A cut's CSV datasets: the patients listing, the response dataset (ADRS-style) and the adverse events (SDTM AE names). */
export const CUT_DATASETS = ['patients', 'adrs', 'ae'] as const;
export type CutDataset = (typeof CUT_DATASETS)[number];
export const cutExportQuerySchema = object({
  dataset: string().oneOf(CUT_DATASETS, `dataset is one of ${CUT_DATASETS.join(', ')}.`).default('patients'),
});

export const RECOMMENDATION_DECISIONS = ['continue', 'stop_futility', 'stop_other', 'modify_protocol', 'resume_accrual', 'stop_safety'] as const;
export type RecommendationDecision = (typeof RECOMMENDATION_DECISIONS)[number];

export const DECISION_ACTIONS = ['resume_stage_2', 'stop', 'final_analysis', 'complete', 'resume_accrual'] as const;
export type DecisionAction = (typeof DECISION_ACTIONS)[number];
/** Decisions that move the cohort to another status (resuming accrual after a safety review leaves it where it is). */
export type StatusDecision = Exclude<DecisionAction, 'resume_accrual'>;

/** A cohort as the cut froze it: its status then, and whether its design has a stage 2. */
type FrozenCohort = { status: string; design: { n1: number | null } | null };

/** A stage 2 exists and has not begun: only then can a cohort continue, or resume accrual, for stage 2. */
export const stage2Ahead = (cohort: FrozenCohort) =>
  cohort.design !== null && cohort.design.n1 !== null && (cohort.status === 'enrolling_stage_1' || cohort.status === 'interim_review');

/** The recommendations a member may sign on a cut: "continue" only where some cohort has a stage 2 ahead. */
export const recommendationChoices = (cohorts: readonly FrozenCohort[]): RecommendationDecision[] =>
  RECOMMENDATION_DECISIONS.filter((decision) => decision !== 'continue' || cohorts.some(stage2Ahead));

/** The decisions the statistician may apply to one cohort of a cut: resuming for stage 2 only where it is ahead. */
export const decisionChoices = (cohort: FrozenCohort): DecisionAction[] =>
  DECISION_ACTIONS.filter((action) => action !== 'resume_stage_2' || stage2Ahead(cohort));

/** What a data cut lists as open at the cut, patient by patient. */
export const OPEN_ISSUE_KINDS = ['pending_outcome', 'unattested_outcome', 'outcome_flag', 'not_evaluable'] as const;
export type OpenIssueKind = (typeof OPEN_ISSUE_KINDS)[number];

export const createDataCutSchema = object({
  cohortId: string().uuid('Choose a cohort of this trial.').nullable().optional(),
  kind: string().oneOf(CUT_KINDS, 'Choose interim or final.').required('Choose interim or final.'),
});
export type CreateDataCutInput = InferType<typeof createDataCutSchema>;

export const recommendationSchema = object({
  decision: string().oneOf(RECOMMENDATION_DECISIONS, 'Choose a recommendation.').required('Choose a recommendation.'),
  rationale: string()
    .trim()
    .min(10, 'Give the committee’s rationale (at least 10 characters).')
    .max(4000, 'Keep the rationale under 4,000 characters.')
    .required('Give the committee’s rationale.'),
  /** The analysis version the member reviewed: signing refuses another. */
  analysisVersion: number().typeError('The analysis version you reviewed is required.').integer().min(1).required('The analysis version you reviewed is required.'),
});
export type RecommendationInput = InferType<typeof recommendationSchema>;

export const decisionSchema = object({
  action: string().oneOf(DECISION_ACTIONS, 'Choose what to apply.').required('Choose what to apply.'),
  /** Needed when the cut covers several cohorts: which cohort the decision moves. */
  cohortId: string().uuid('Choose a cohort of this data cut.').nullable().optional(),
  reason: string().trim().min(5, 'Give a reason (at least 5 characters).').max(2000, 'Keep the reason under 2,000 characters.').required('Give a reason.'),
  stopCategory: string()
    .oneOf(STOP_CATEGORIES, 'Choose why the cohort stops.')
    .nullable()
    .optional()
    .when('action', {
      is: 'stop',
      then: (s) => s.required('Choose why the cohort stops.'),
    }),
});
export type DecisionInput = InferType<typeof decisionSchema>;

/** The prior for the Bayesian figures; a and b both empty go back to the stated default. */
export const priorSchema = object({
  a: number().typeError('Enter a number.').positive('Must be above 0.').max(1000, 'At most 1,000.').nullable().defined(),
  b: number()
    .typeError('Enter a number.')
    .positive('Must be above 0.')
    .max(1000, 'At most 1,000.')
    .nullable()
    .defined()
    .test('both', 'Give both a and b, or neither for the default.', function both(value) {
      return (value === null) === (this.parent.a === null);
    }),
  thetaT: number()
    .typeError('Enter a number.')
    .moreThan(0, 'Between 0 and 1.')
    .lessThan(1, 'Between 0 and 1.')
    .required('Give the success threshold.'),
  version: number().integer().required('The version you edited is required.'),
});
export type PriorInput = InferType<typeof priorSchema>;
