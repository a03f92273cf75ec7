import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { PriorInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutKeys } from './query-keys';
import type { DataCut } from './types';

export function useSavePrior(cutId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: PriorInput) => api<{ dataCut: DataCut }>(`/api/data-cuts/${cutId}/prior`, { method: 'PATCH', body: input }),
    // The cut's detail and every analysis of it (saved and tried priors) depend on the setting.
    onSuccess: () => invalidate(dataCutKeys.detail(cutId), dataCutKeys.analyses(cutId)),
  });
}
