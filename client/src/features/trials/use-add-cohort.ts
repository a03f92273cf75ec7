import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CohortInput } from '../../../../server/trials/trials.schema';
import type { Cohort } from './get-trial';
import { trialsQueryOptions } from './get-trials';

export function useAddCohort(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: CohortInput) =>
      (await api<{ cohort: Cohort }>(`/api/trials/${trialId}/cohorts`, { method: 'POST', body: input })).cohort,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey }),
  });
}
