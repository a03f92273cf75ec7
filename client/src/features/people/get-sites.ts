import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';

export type Site = { id: string; code: string; name: string; country: string; version: number; trialCount: number; updatedAt: string };

export const sitesQueryOptions = () =>
  queryOptions({
    queryKey: ['sites'],
    queryFn: async () => (await api<{ sites: Site[] }>('/api/sites')).sites,
  });

export const useSites = () => useQuery(sitesQueryOptions());
