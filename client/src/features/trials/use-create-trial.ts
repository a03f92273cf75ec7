import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { TrialCreateInput } from '../../../../server/trials/trials.schema';
import { trialsQueryOptions } from './get-trials';
import { meQueryOptions } from '../auth';
import type { TrialDetail } from './get-trial';

export function useCreateTrial() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: TrialCreateInput) => (await api<{ trial: TrialDetail }>('/api/trials', { method: 'POST', body: input })).trial,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey });
      // The creator is now admin of the new trial: their roles changed.
      await queryClient.invalidateQueries({ queryKey: meQueryOptions().queryKey });
    },
  });
}
