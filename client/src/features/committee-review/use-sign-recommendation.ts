import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { RecommendationInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutQueryOptions } from '../data-cuts';
import type { Recommendations } from './get-recommendations';

export function useSignRecommendation(cutId: string, trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: RecommendationInput) => api<Recommendations>(`/api/data-cuts/${cutId}/recommendations`, { method: 'POST', body: input }),
    onSuccess: () =>
      Promise.all([
        // The cut's detail, its recommendations and the trial's list of cuts all count signatures.
        queryClient.invalidateQueries({ queryKey: dataCutQueryOptions(cutId).queryKey }),
        queryClient.invalidateQueries({ queryKey: ['trials', trialId, 'data-cuts'] }),
      ]),
  });
}
