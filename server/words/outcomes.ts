/** How a patient's outcome and a timepoint response read. */
import type { TIMEPOINT_RESPONSES } from '../assessments/assessments.schema.js';

/** A timepoint response with its RECIST 1.1 meaning. */
export const RESPONSE_LABELS: Record<(typeof TIMEPOINT_RESPONSES)[number], string> = {
  CR: 'CR — complete response',
  PR: 'PR — partial response',
  SD: 'SD — stable disease',
  PD: 'PD — progressive disease',
  NE: 'NE — not evaluable',
};

/** A settled responder status. */
export const responderWords = (responder: boolean) => (responder ? 'responder' : 'non-responder');
