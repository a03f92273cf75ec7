/** How a cohort's status, its stop category and its analysis population read to a person. */
import type { CohortStatus, StopCategory } from '../trials/trials.schema.js';
import type { ANALYSIS_POPULATIONS } from '../designs/designs.schema.js';
import { GLYPHS, type Worded } from './glyphs.js';

/** A trial's status is its only cohort's, or "mixed" when its cohorts differ. */
export type TrialStatus = CohortStatus | 'mixed';

/** A status as a label with its glyph (tags, the Portfolio, the digest, the report). */
export const STATUS_WORDS: Record<TrialStatus, Worded> = {
  draft: { label: 'Draft', glyph: GLYPHS.draft },
  enrolling_stage_1: { label: 'Enrolling stage 1', glyph: GLYPHS.enrollingStage1 },
  interim_review: { label: 'Interim review', glyph: GLYPHS.paused },
  enrolling_stage_2: { label: 'Enrolling stage 2', glyph: GLYPHS.stage2 },
  final_analysis: { label: 'Final analysis', glyph: GLYPHS.finalAnalysis },
  completed: { label: 'Completed', glyph: GLYPHS.done },
  stopped: { label: 'Stopped', glyph: GLYPHS.stopped },
  mixed: { label: 'Cohorts differ', glyph: GLYPHS.mixed },
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

/** A stored stop category (a free string in older rows) after "stopped"; an unknown one reads as "another reason". */
export const stoppedFor = (category: string | null | undefined): string => STOPPED_FOR[category as StopCategory] ?? STOPPED_FOR.other;

/** The analysis population inside a sentence: "(all enrolled population)". */
export const POPULATION_IN_A_SENTENCE: Record<(typeof ANALYSIS_POPULATIONS)[number], string> = {
  all_enrolled: 'all enrolled',
  evaluable: 'evaluable',
};

/** Who the design counts, as a short phrase beside the design. */
export const POPULATION_COUNTS: Record<(typeof ANALYSIS_POPULATIONS)[number], string> = {
  all_enrolled: 'every enrolled patient counts (not evaluable = non-responder)',
  evaluable: 'evaluable patients count (not evaluable ones are replaced)',
};
