import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { TrialUpdateInput } from '../../../../server/trials/trials.schema';
import { wholeTrialKeys } from './query-keys';
import type { TrialDetail } from './get-trial';

export function useUpdateTrial(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: TrialUpdateInput) =>
      (await api<{ trial: TrialDetail }>(`/api/trials/${trialId}`, { method: 'PATCH', body: input })).trial,
    // Also after a 409, so the form shows the record as it now is.
    onSettled: () => invalidate(...wholeTrialKeys(trialId)),
  });
}
