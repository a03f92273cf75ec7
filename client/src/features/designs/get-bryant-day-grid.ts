import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { BryantDayCharacteristicsInput } from '../../../../server/safety/safety.schema';
import { designKeys } from './query-keys';
import type { BryantDayGrid } from './types';

/** A Bryant–Day design's probability of a promising result over response × toxicity rates, and the effect of an association between them. */
export const bryantDayGridQueryOptions = (trialId: string, input: BryantDayCharacteristicsInput) =>
  queryOptions({
    queryKey: designKeys.bryantDayGrid(trialId, input),
    queryFn: ({ signal }) => api<BryantDayGrid>(`/api/trials/${trialId}/safety-designs/characteristics`, { method: 'POST', body: input, signal }),
    staleTime: Infinity,
  });

export const useBryantDayGrid = (trialId: string, input: BryantDayCharacteristicsInput) => useQuery({ ...bryantDayGridQueryOptions(trialId, input), placeholderData: keepPreviousData });
