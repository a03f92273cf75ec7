/** How a patient's outcome, evaluability and a timepoint response read. */
import type { TIMEPOINT_RESPONSES } from '../assessments/assessments.schema.js';
import type { Outcome } from '../patients/patients.schema.js';
import { GLYPHS, type Worded } from './glyphs.js';

/** A patient's outcome as a label with its glyph. */
export const OUTCOME_WORDS: Record<Outcome, Worded> = {
  pending: { label: 'Pending', glyph: GLYPHS.pending },
  responder: { label: 'Responder', glyph: GLYPHS.responder },
  non_responder: { label: 'Non-responder', glyph: GLYPHS.nonResponder },
};

/** The evaluability flag, the only thing "evaluable" names. */
export const EVALUABILITY_WORDS: Record<'evaluable' | 'notEvaluable', Worded> = {
  evaluable: { label: 'Evaluable', glyph: GLYPHS.done },
  notEvaluable: { label: 'Not evaluable', glyph: GLYPHS.notEvaluable },
};

/** A timepoint response with its RECIST 1.1 meaning. */
export const RESPONSE_LABELS: Record<(typeof TIMEPOINT_RESPONSES)[number], string> = {
  CR: 'CR — complete response',
  PR: 'PR — partial response',
  SD: 'SD — stable disease',
  PD: 'PD — progressive disease',
  NE: 'NE — not evaluable',
};

/** A settled responder status inside a sentence. */
export const responderWords = (responder: boolean) => (responder ? 'responder' : 'non-responder');
