import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Recommendation } from '../data-cuts';
import { reviewKeys } from './query-keys';

export type Recommendations = { recommendations: Recommendation[]; committeeSize: number; signed: number };

export const recommendationsQueryOptions = (cutId: string) =>
  queryOptions({
    queryKey: reviewKeys.recommendations(cutId),
    queryFn: () => api<Recommendations>(`/api/data-cuts/${cutId}/recommendations`),
  });

export const useRecommendations = (cutId: string) => useQuery(recommendationsQueryOptions(cutId));
