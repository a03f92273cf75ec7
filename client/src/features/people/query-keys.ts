import { trialKeys } from '../trials';

/** The query keys of People & sites: the sites every trial shares, and each trial's memberships. */
export const peopleKeys = {
  sites: () => ['sites'] as const,
  memberships: (trialId: string) => [...trialKeys.scope(trialId), 'memberships'] as const,
};
