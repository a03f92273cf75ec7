import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { RecommendationInput } from '../../../../server/data-cuts/data-cuts.schema';
import { authKeys } from '../auth';
import { dataCutKeys } from '../data-cuts';
import { portfolioKeys } from '../portfolio';
import type { Recommendations } from './get-recommendations';
import { reviewKeys } from './query-keys';

export function useSignRecommendation(cutId: string, trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: RecommendationInput) => api<Recommendations>(`/api/data-cuts/${cutId}/recommendations`, { method: 'POST', body: input }),
    // The cut's detail, its recommendations and the trial's list of cuts all count signatures; the Portfolio shows the latest; the signature used the session's password entry.
    onSuccess: () => invalidate(dataCutKeys.detail(cutId), reviewKeys.recommendations(cutId), dataCutKeys.list(trialId), portfolioKeys.all(), authKeys.me()),
  });
}
