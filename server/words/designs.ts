/** How a design's kind reads: the trade's names for Simon's designs. */
import type { Selection } from '../designs/designs.schema.js';

export const SELECTION_LABELS: Record<Selection, string> = {
  single_stage: 'Single-stage',
  optimal: 'Simon optimal',
  minimax: 'Simon minimax',
  admissible: 'Admissible',
};
