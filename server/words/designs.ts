/** How a design's kind and the protocol's settings read: the trade's names for Simon's designs, and the protocol's choices. */
import type { ANALYSIS_POPULATIONS, INTERIM_ACCRUAL, Selection } from '../designs/designs.schema.js';
import type { NE_BETWEEN_RESPONSES, OUTCOME_SOURCES } from '../trials/trials.schema.js';

export const SELECTION_LABELS: Record<Selection, string> = {
  single_stage: 'Single-stage',
  optimal: 'Simon optimal',
  minimax: 'Simon minimax',
  admissible: 'Admissible',
};

/** The analysis population as a choice (the design form, the signature dialog, the audit trail). */
export const POPULATION_LABELS: Record<(typeof ANALYSIS_POPULATIONS)[number], string> = {
  all_enrolled: 'All enrolled (not evaluable counts as non-responder)',
  evaluable: 'Evaluable (not evaluable patients are replaced)',
};

/** What accrual does once n1 patients are enrolled. */
export const INTERIM_ACCRUAL_LABELS: Record<(typeof INTERIM_ACCRUAL)[number], string> = {
  pause: 'Pauses for the interim review',
  continue_at_risk: 'Continues at risk',
};

/** Where a patient's outcome comes from. */
export const OUTCOME_SOURCE_LABELS: Record<(typeof OUTCOME_SOURCES)[number], string> = {
  entered: 'Entered by the site (best overall response recorded directly)',
  derived: 'Derived from timepoint assessments (RECIST 1.1)',
};

/** How a not-evaluable assessment between two responses counts. */
export const NE_BETWEEN_RESPONSES_LABELS: Record<(typeof NE_BETWEEN_RESPONSES)[number], string> = {
  ignore: 'Does not break a confirmation',
  breaks_confirmation: 'Breaks the confirmation',
};
