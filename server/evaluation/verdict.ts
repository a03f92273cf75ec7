/**
 * The verdict of one cohort, the same computation for the live evaluation and a data cut (and so
 * the report and the exports): the cohort's counts under the one counting definition (counting.ts:
 * stage 1 is the first n1 counting patients), the look its status puts it at, the engine's
 * `cohortVerdict` (its rules are stated in server/stats/verdict.ts), and the words beside it.
 */
import { cohortVerdict, type Verdict, type VerdictDesign, type VerdictLook } from '../stats/index.js';
import { atRiskSentence, sensitivityDisagreement, verdictSentence } from '../words/index.js';
import type { CohortStatus } from '../trials/index.js';
import type { Tally } from './counting.js';

export type CohortVerdict = Verdict & {
  message: string;
  /** Stage-2 patients enrolled at risk and left out of the stage-1 rule, in a sentence. */
  atRiskNote: string | null;
  /** Said when the primary p-value and the sensitivity figure disagree about p ≤ α. */
  sensitivityNote: string | null;
};

const FINAL_STATUSES: readonly CohortStatus[] = ['final_analysis', 'completed', 'stopped'];

/**
 * The look a verdict takes: a final analysis once the cohort is in its final analysis, completed or
 * stopped (no patient will join), or when a data cut was frozen as final; the final rule while stage 2
 * enrols; the stage-1 rule before the interim decision.
 */
export function verdictLook(status: CohortStatus, finalCut = false): VerdictLook {
  if (finalCut || FINAL_STATUSES.includes(status)) return 'final';
  return status === 'enrolling_stage_2' ? 'stage-2' : 'stage-1';
}

/** The verdict in numbers and states, from the cohort's tally. */
export function verdictFigures(design: VerdictDesign, counts: Tally, look: VerdictLook): Verdict {
  return cohortVerdict(design, { stage1: counts.stage1, stage2: counts.stage2 }, look);
}

/** The verdict with the sentences read beside it. */
export function describeVerdict(verdict: Verdict, design: Pick<VerdictDesign, 'r1' | 'r'>): CohortVerdict {
  return {
    ...verdict,
    message: verdictSentence(verdict, design),
    atRiskNote: atRiskSentence(verdict),
    sensitivityNote: sensitivityDisagreement(verdict.finalTest),
  };
}
