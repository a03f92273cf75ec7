import { portfolioKeys } from '../portfolio';

/**
 * The trials' query keys, and the root of every trial's keys: whatever is cached about one trial
 * (its patients, evaluation, data cuts …) sits under `trialKeys.scope(trialId)`, each feature's
 * factory building on it.
 */
export const trialKeys = {
  /** Every trial's cached data: for a change that shows on every trial, such as a site's code. */
  all: () => ['trials'] as const,
  scope: (trialId: string) => [...trialKeys.all(), trialId] as const,
  /** The trial record with the reader's roles and sites. */
  detail: (trialId: string) => [...trialKeys.scope(trialId), 'detail'] as const,
};

/**
 * What a change that frames the whole trial makes stale — its record or cohorts, its protocol
 * settings, a cohort's status or design: every page of the trial reads them, and so does the
 * Portfolio.
 */
export const wholeTrialKeys = (trialId: string) => [trialKeys.scope(trialId), portfolioKeys.all()];
