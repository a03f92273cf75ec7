import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { ToxicityBoundarySettings } from '../../../../server/safety/safety.schema';
import { designKeys } from './query-keys';
import type { BoundaryWithCurve } from './types';

/** The continuous toxicity boundary for n, θ and α with its operating characteristics. */
export const toxicityBoundaryQueryOptions = (trialId: string, settings: ToxicityBoundarySettings) =>
  queryOptions({
    queryKey: designKeys.boundary(trialId, settings),
    queryFn: ({ signal }) => api<BoundaryWithCurve>(`/api/trials/${trialId}/toxicity-boundary/characteristics`, { method: 'POST', body: settings, signal }),
    staleTime: Infinity,
  });

export const useToxicityBoundary = (trialId: string, settings: ToxicityBoundarySettings) => useQuery({ ...toxicityBoundaryQueryOptions(trialId, settings), placeholderData: keepPreviousData });
