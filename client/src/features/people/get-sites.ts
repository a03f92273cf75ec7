import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { peopleKeys } from './query-keys';

export type Site = { id: string; code: string; name: string; country: string; version: number; trialCount: number; updatedAt: string };

export const sitesQueryOptions = () =>
  queryOptions({
    queryKey: peopleKeys.sites(),
    queryFn: async () => (await api<{ sites: Site[] }>('/api/sites')).sites,
  });

export const useSites = () => useQuery(sitesQueryOptions());
