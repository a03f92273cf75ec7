import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { TrialCreateInput } from '../../../../server/trials/trials.schema';
import { trialsQueryOptions } from '../portfolio/get-trials';
import { meQueryOptions } from '../auth/get-me';
import type { TrialSetup } from './trial-setup';

export function useCreateTrial() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: TrialCreateInput) => (await api<{ trial: TrialSetup }>('/api/trials', { method: 'POST', body: input })).trial,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey });
      // The creator is now admin of the new trial: their roles changed.
      await queryClient.invalidateQueries({ queryKey: meQueryOptions().queryKey });
    },
  });
}
