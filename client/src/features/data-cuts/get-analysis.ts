import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { dataCutKeys } from './query-keys';
import type { Analysis, PriorQuery } from './types';

/** The analysis of a cut; a prior in `trial` is tried for this answer only (nothing is saved). */
export const analysisQueryOptions = (cutId: string, trial: PriorQuery = {}) =>
  queryOptions({
    queryKey: dataCutKeys.analysis(cutId, trial),
    queryFn: async () => {
      const query = new URLSearchParams(Object.entries(trial).filter(([, v]) => v !== undefined).map(([k, v]) => [k, String(v)]));
      const suffix = query.size > 0 ? `?${query}` : '';
      return (await api<{ analysis: Analysis }>(`/api/data-cuts/${cutId}/analysis${suffix}`)).analysis;
    },
    placeholderData: keepPreviousData,
  });

export const useAnalysis = (cutId: string, trial?: PriorQuery) => useQuery(analysisQueryOptions(cutId, trial));
