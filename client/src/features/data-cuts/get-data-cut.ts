import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { DataCutDetail } from './types';

export const dataCutQueryOptions = (cutId: string) =>
  queryOptions({
    queryKey: ['data-cuts', cutId],
    queryFn: () => api<DataCutDetail>(`/api/data-cuts/${cutId}`),
  });

export const useDataCut = (cutId: string) => useQuery(dataCutQueryOptions(cutId));
