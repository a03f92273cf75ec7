import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { SafetyDesignSettings } from '../../../../server/safety/safety.schema';
import { designKeys } from './query-keys';
import type { BryantDayDesigns } from './types';

/** The Bryant–Day optimal and minimax designs: a pure computation on the server (a POST that writes nothing), cached by its settings. */
export const safetyDesignsQueryOptions = (trialId: string, settings: SafetyDesignSettings) =>
  queryOptions({
    queryKey: designKeys.safetyCandidates(trialId, settings),
    queryFn: ({ signal }) => api<BryantDayDesigns>(`/api/trials/${trialId}/safety-designs`, { method: 'POST', body: settings, signal }),
    staleTime: Infinity,
  });

export const useSafetyDesigns = (trialId: string, settings: SafetyDesignSettings | null) =>
  useQuery({
    ...safetyDesignsQueryOptions(trialId, settings ?? { pR0: 0, pR1: 0, toxAcceptable: 0, toxUnacceptable: 0, alphaR: 0, alphaT: 0, beta: 0, nmax: 0 }),
    enabled: settings !== null,
    placeholderData: keepPreviousData,
  });
