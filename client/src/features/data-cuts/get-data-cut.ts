import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { dataCutKeys } from './query-keys';
import type { DataCutDetail } from './types';

export const dataCutQueryOptions = (cutId: string) =>
  queryOptions({
    queryKey: dataCutKeys.detail(cutId),
    queryFn: () => api<DataCutDetail>(`/api/data-cuts/${cutId}`),
  });

export const useDataCut = (cutId: string) => useQuery(dataCutQueryOptions(cutId));
