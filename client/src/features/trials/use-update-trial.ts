import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { TrialUpdateInput } from '../../../../server/trials/trials.schema';
import { trialsQueryOptions } from './get-trials';
import type { TrialDetail } from './get-trial';

export function useUpdateTrial(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: TrialUpdateInput) =>
      (await api<{ trial: TrialDetail }>(`/api/trials/${trialId}`, { method: 'PATCH', body: input })).trial,
    // Also after a 409, so the form shows the record as it now is.
    onSettled: () => queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey }),
  });
}
