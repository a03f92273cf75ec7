/**
 * How the committee's recommendations and the decisions applied to a cohort read, and the one
 * wording of a recommendation's electronic signature: the form shows it as the member chooses, and
 * the server records exactly the same text.
 */
import type { DecisionAction, RecommendationDecision } from '../data-cuts/data-cuts.schema.js';
import { GLYPHS, type Worded } from './glyphs.js';

/** A recommendation, in the interface, the signature's meaning, the mail and the report. */
export const RECOMMENDATION_WORDS: Record<RecommendationDecision, Worded> = {
  continue: { label: 'Continue to stage 2', glyph: GLYPHS.stage2 },
  stop_futility: { label: 'Stop for futility', glyph: GLYPHS.futility },
  stop_other: { label: 'Stop for another reason', glyph: GLYPHS.stopped },
  modify_protocol: { label: 'Modify the protocol', glyph: GLYPHS.change },
  resume_accrual: { label: 'Resume accrual after the safety review', glyph: GLYPHS.resumed },
  stop_safety: { label: 'Stop for safety', glyph: GLYPHS.stopped },
};

/** A decision the statistician applies to a cohort from a data cut. */
export const DECISION_WORDS: Record<DecisionAction, Worded> = {
  resume_stage_2: { label: 'Resume accrual for stage 2', glyph: GLYPHS.stage2 },
  stop: { label: 'Stop the cohort', glyph: GLYPHS.stopped },
  final_analysis: { label: 'Go to the final analysis', glyph: GLYPHS.finalAnalysis },
  complete: { label: 'Complete the cohort', glyph: GLYPHS.done },
  resume_accrual: { label: 'Resume accrual after the safety review', glyph: GLYPHS.resumed },
};

/** Stands for the recommendation in the signature's wording until the member has chosen one. */
export const CHOICE_NOT_MADE = '(your choice)';

/**
 * The meaning of a committee member's signature on a recommendation. The review form shows it with
 * the choice filled in as it is made; the server records it with the same inputs, so what the member
 * read is what is signed.
 */
export function recommendationMeaning(input: {
  decision: RecommendationDecision | null;
  trialCode: string;
  cohortCodes: readonly string[];
  cutSeq: number;
  cutId: string;
  /** The analysis version the member reviewed and signs. */
  analysisVersion: number;
}): string {
  const choice = input.decision ? `"${RECOMMENDATION_WORDS[input.decision].label}"` : CHOICE_NOT_MADE;
  const cohorts = `${input.cohortCodes.length === 1 ? 'cohort' : 'cohorts'} ${input.cohortCodes.join(', ')}`;
  return `I recommend ${choice} for ${input.trialCode} ${cohorts} on data cut ${input.cutSeq} (${input.cutId}), having reviewed its analysis version ${input.analysisVersion}.`;
}
