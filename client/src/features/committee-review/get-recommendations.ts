import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Recommendation } from '../data-cuts';

export type Recommendations = { recommendations: Recommendation[]; committeeSize: number; signed: number };

export const recommendationsQueryOptions = (cutId: string) =>
  queryOptions({
    queryKey: ['data-cuts', cutId, 'recommendations'],
    queryFn: () => api<Recommendations>(`/api/data-cuts/${cutId}/recommendations`),
  });

export const useRecommendations = (cutId: string) => useQuery(recommendationsQueryOptions(cutId));
