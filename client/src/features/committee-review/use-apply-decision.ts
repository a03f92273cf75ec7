import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { DecisionInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutQueryOptions, type AppliedDecision } from '../data-cuts';
import { trialQueryOptions } from '../trials';

export function useApplyDecision(cutId: string, trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: DecisionInput) => api<{ decision: AppliedDecision }>(`/api/data-cuts/${cutId}/decision`, { method: 'POST', body: input }),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: dataCutQueryOptions(cutId).queryKey }),
        // The trial's status (and every list of its cuts) moves with the decision.
        queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey }),
      ]),
  });
}
