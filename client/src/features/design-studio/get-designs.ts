import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CohortDesigns } from './types';

export const designsQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: ['trials', trialId, 'designs'],
    queryFn: async () => (await api<{ cohorts: CohortDesigns[] }>(`/api/trials/${trialId}/designs`)).cohorts,
  });

export const useDesigns = (trialId: string) => useQuery(designsQueryOptions(trialId));
