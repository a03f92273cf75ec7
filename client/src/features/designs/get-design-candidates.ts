import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { designKeys } from './query-keys';
import type { DesignCandidates, DesignSettings } from './types';

/** A pure computation on the server (a POST that writes nothing), cached by its settings. */
export const designCandidatesQueryOptions = (trialId: string, settings: DesignSettings) =>
  queryOptions({
    queryKey: designKeys.candidates(trialId, settings),
    queryFn: ({ signal }) => api<DesignCandidates>(`/api/trials/${trialId}/design-candidates`, { method: 'POST', body: settings, signal }),
    staleTime: Infinity,
  });

export const useDesignCandidates = (trialId: string, settings: DesignSettings | null) =>
  useQuery({
    ...designCandidatesQueryOptions(trialId, settings ?? { p0: 0, p1: 0, alpha: 0, beta: 0, nmax: 0 }),
    enabled: settings !== null,
    placeholderData: keepPreviousData,
  });
