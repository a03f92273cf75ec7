/** How a cohort's status, its stop category and its analysis population read to a person. */
import type { CohortStatus, StopCategory } from '../trials/trials.schema.js';
import type { ANALYSIS_POPULATIONS } from '../designs/designs.schema.js';

/** A status as a label (the Portfolio, the weekly digest). */
export const STATUS_LABELS: Record<CohortStatus, string> = {
  draft: 'Draft',
  enrolling_stage_1: 'Enrolling stage 1',
  interim_review: 'Interim review',
  enrolling_stage_2: 'Enrolling stage 2',
  final_analysis: 'Final analysis',
  completed: 'Completed',
  stopped: 'Stopped',
};

/** A status inside a sentence: "Cohort MAIN is … and does not enrol patients." */
export const STATUS_IN_A_SENTENCE: Record<CohortStatus, string> = {
  draft: 'in draft (its design is not locked yet)',
  enrolling_stage_1: 'enrolling stage 1',
  interim_review: 'in interim review',
  enrolling_stage_2: 'enrolling stage 2',
  final_analysis: 'in its final analysis',
  completed: 'completed',
  stopped: 'stopped',
};

/** A stop category as a label (the decision form, the report). */
export const STOP_CATEGORY_LABELS: Record<StopCategory, string> = {
  futility: 'Futility',
  efficacy: 'Efficacy or early decision',
  safety: 'Safety',
  sponsor: 'Sponsor decision',
  other: 'Other',
};

/** A stop category after "stopped": "stopped for futility". */
export const STOPPED_FOR: Record<StopCategory, string> = {
  futility: 'for futility',
  efficacy: 'for efficacy or an early decision',
  safety: 'for safety',
  sponsor: 'by sponsor decision',
  other: 'for another reason',
};

/** The analysis population inside a sentence: "(all enrolled population)". */
export const POPULATION_IN_A_SENTENCE: Record<(typeof ANALYSIS_POPULATIONS)[number], string> = {
  all_enrolled: 'all enrolled',
  evaluable: 'evaluable',
};
