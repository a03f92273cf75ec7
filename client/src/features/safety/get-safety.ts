import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { safetyKeys } from './query-keys';
import type { TrialSafety } from './types';

export const safetyQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: safetyKeys.state(trialId),
    queryFn: () => api<TrialSafety>(`/api/trials/${trialId}/safety`),
  });

/** The live safety state; only pages shown to those who may see safety figures ask for it. */
export const useSafety = (trialId: string) => useQuery(safetyQueryOptions(trialId));
