import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { designKeys } from './query-keys';
import type { CohortDesigns } from './types';

export const designsQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: designKeys.all(trialId),
    queryFn: async () => (await api<{ cohorts: CohortDesigns[] }>(`/api/trials/${trialId}/designs`)).cohorts,
  });

export const useDesigns = (trialId: string) => useQuery(designsQueryOptions(trialId));
