import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Trial } from './get-trial';

export type TrialSummary = Omit<Trial, 'mySiteIds'>;

export const trialsQueryOptions = () =>
  queryOptions({
    queryKey: ['trials'],
    queryFn: async () => (await api<{ trials: TrialSummary[] }>('/api/trials')).trials,
  });

export const useTrials = () => useQuery(trialsQueryOptions());
