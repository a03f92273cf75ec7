import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { ProtocolSettingsInput } from '../../../../server/trials/trials.schema';
import { trialsQueryOptions } from './get-trials';
import type { TrialDetail } from './get-trial';

export function useUpdateProtocolSettings(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: ProtocolSettingsInput) =>
      (await api<{ trial: TrialDetail }>(`/api/trials/${trialId}/protocol-settings`, { method: 'PATCH', body: input })).trial,
    onSettled: () => queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey }),
  });
}
