import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { CreateDataCutInput } from '../../../../server/data-cuts/data-cuts.schema';
import { portfolioKeys } from '../portfolio';
import { dataCutKeys } from './query-keys';
import type { DataCut } from './types';

export function useFreezeDataCut(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: CreateDataCutInput) => api<{ dataCut: DataCut }>(`/api/trials/${trialId}/data-cuts`, { method: 'POST', body: input }),
    // The Portfolio's next milestone becomes the review of this cut.
    onSuccess: () => invalidate(dataCutKeys.list(trialId), portfolioKeys.all()),
  });
}
