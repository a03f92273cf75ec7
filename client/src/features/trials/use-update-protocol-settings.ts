import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { ProtocolSettingsInput } from '../../../../server/trials/trials.schema';
import { wholeTrialKeys } from './query-keys';
import type { TrialDetail } from './get-trial';

export function useUpdateProtocolSettings(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: ProtocolSettingsInput) =>
      (await api<{ trial: TrialDetail }>(`/api/trials/${trialId}/protocol-settings`, { method: 'PATCH', body: input })).trial,
    onSettled: () => invalidate(...wholeTrialKeys(trialId)),
  });
}
