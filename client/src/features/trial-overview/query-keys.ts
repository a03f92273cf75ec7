import { trialKeys } from '../trials';

/** The Trial overview's query key: the live evaluation of the trial's cohorts. */
export const overviewKeys = {
  evaluation: (trialId: string) => [...trialKeys.scope(trialId), 'evaluation'] as const,
};
