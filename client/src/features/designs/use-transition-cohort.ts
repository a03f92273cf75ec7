import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import { wholeTrialKeys } from '../trials';

export type TransitionBody = { to: string; from?: string; reason?: string; stopCategory?: string };

/** Opens accrual (draft → enrolling stage 1) or stops a cohort with a category and a reason. */
export function useTransitionCohort(trialId: string, cohortId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (body: TransitionBody) =>
      api<{ cohort: { status: string } }>(`/api/trials/${trialId}/cohorts/${cohortId}/transitions`, { method: 'POST', body }),
    // A cohort's status shows on every page of the trial and in the Portfolio.
    onSuccess: () => void invalidate(...wholeTrialKeys(trialId)),
  });
}
