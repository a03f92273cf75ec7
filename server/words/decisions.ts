/** How the committee's recommendations and the decisions applied to a cohort read. */
import type { DecisionAction, RecommendationDecision } from '../data-cuts/data-cuts.schema.js';

/** A recommendation, in the interface, the signature's meaning and the report. */
export const RECOMMENDATION_LABELS: Record<RecommendationDecision, string> = {
  continue: 'Continue to stage 2',
  stop_futility: 'Stop for futility',
  stop_other: 'Stop for another reason',
  modify_protocol: 'Modify the protocol',
  resume_accrual: 'Resume accrual after the safety review',
  stop_safety: 'Stop for safety',
};

/** A decision the statistician applies to a cohort from a data cut. */
export const DECISION_LABELS: Record<DecisionAction, string> = {
  resume_stage_2: 'Resume accrual for stage 2',
  stop: 'Stop the cohort',
  final_analysis: 'Go to the final analysis',
  complete: 'Complete the cohort',
  resume_accrual: 'Resume accrual after the safety review',
};
