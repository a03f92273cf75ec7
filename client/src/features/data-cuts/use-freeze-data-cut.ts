import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CreateDataCutInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutsQueryOptions } from './get-data-cuts';
import type { DataCut } from './types';

export function useFreezeDataCut(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateDataCutInput) => api<{ dataCut: DataCut }>(`/api/trials/${trialId}/data-cuts`, { method: 'POST', body: input }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: dataCutsQueryOptions(trialId).queryKey }),
  });
}
