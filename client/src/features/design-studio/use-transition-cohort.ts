import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { trialQueryOptions } from '../trials';
import { designsQueryOptions } from './get-designs';

export type TransitionBody = { to: string; from?: string; reason?: string; stopCategory?: string };

/** Opens accrual (draft → enrolling stage 1) or stops a cohort with a category and a reason. */
export function useTransitionCohort(trialId: string, cohortId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: TransitionBody) =>
      api<{ cohort: { status: string } }>(`/api/trials/${trialId}/cohorts/${cohortId}/transitions`, { method: 'POST', body }),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: designsQueryOptions(trialId).queryKey });
      void queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey, exact: true });
    },
  });
}
