/** How statuses, stages and stop reasons read in the Portfolio and the weekly digest. */
import type { CohortStatus } from '../trials/trials.repository.js';

export const STATUS_WORDS: Record<CohortStatus, string> = {
  draft: 'Draft',
  enrolling_stage_1: 'Enrolling stage 1',
  interim_review: 'Interim review',
  enrolling_stage_2: 'Enrolling stage 2',
  final_analysis: 'Final analysis',
  completed: 'Completed',
  stopped: 'Stopped',
};

export const STOP_WORDS: Record<string, string> = {
  futility: 'for futility',
  efficacy: 'for efficacy or an early decision',
  safety: 'for safety',
  sponsor: 'by sponsor decision',
  other: 'for another reason',
};

export const plural = (count: number, word: string, many = `${word}s`) => `${count} ${count === 1 ? word : many}`;
