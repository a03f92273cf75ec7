import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { PriorInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutQueryOptions } from './get-data-cut';
import type { DataCut } from './types';

export function useSavePrior(cutId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: PriorInput) => api<{ dataCut: DataCut }>(`/api/data-cuts/${cutId}/prior`, { method: 'PATCH', body: input }),
    // The cut's detail and every analysis of it (saved and tried priors) depend on the setting.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: dataCutQueryOptions(cutId).queryKey }),
  });
}
