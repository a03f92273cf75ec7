import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { safetyKeys } from './query-keys';
import type { AdverseEvent, EventFilters } from './types';

const toQuery = (filters: EventFilters) =>
  new URLSearchParams(Object.entries(filters).flatMap(([key, value]) => (value === undefined || value === '' ? [] : [[key, String(value)]]))).toString();

export const adverseEventsQueryOptions = (trialId: string, filters: EventFilters) =>
  queryOptions({
    queryKey: safetyKeys.list(trialId, filters),
    queryFn: () => api<{ events: AdverseEvent[]; total: number; page: number; pageSize: number }>(`/api/trials/${trialId}/adverse-events?${toQuery(filters)}`),
    placeholderData: keepPreviousData,
  });

export const useAdverseEvents = (trialId: string, filters: EventFilters) => useQuery(adverseEventsQueryOptions(trialId, filters));
