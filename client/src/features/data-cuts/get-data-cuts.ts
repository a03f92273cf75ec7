import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { dataCutKeys } from './query-keys';
import type { DataCutListItem } from './types';

export const dataCutsQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: dataCutKeys.list(trialId),
    queryFn: () => api<{ dataCuts: DataCutListItem[]; committeeSize: number }>(`/api/trials/${trialId}/data-cuts`),
  });

export const useDataCuts = (trialId: string) => useQuery(dataCutsQueryOptions(trialId));
