import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CohortUpdateInput } from '../../../../server/trials/trials.schema';
import type { Cohort } from './get-trial';
import { trialsQueryOptions } from './get-trials';

export function useUpdateCohort(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ cohortId, ...input }: CohortUpdateInput & { cohortId: string }) =>
      (await api<{ cohort: Cohort }>(`/api/trials/${trialId}/cohorts/${cohortId}`, { method: 'PATCH', body: input })).cohort,
    onSettled: () => queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey }),
  });
}
