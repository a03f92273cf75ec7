import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Role } from '../../lib/roles';
import { trialQueryOptions } from '../trial-overview/get-trial';

export type Membership = {
  id: string;
  trialId: string;
  email: string;
  role: Role;
  status: 'pending' | 'active';
  siteId: string | null;
  siteCode: string | null;
  userId: string | null;
  name: string | null;
  version: number;
  createdAt: string;
};

export const membershipsQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: [...trialQueryOptions(trialId).queryKey, 'memberships'],
    queryFn: async () => (await api<{ memberships: Membership[] }>(`/api/trials/${trialId}/memberships`)).memberships,
  });

export const useMemberships = (trialId: string) => useQuery(membershipsQueryOptions(trialId));
