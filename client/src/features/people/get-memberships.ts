import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Membership } from '../../../../server/people/people.repository';
import { peopleKeys } from './query-keys';

export type { Membership };

export const membershipsQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: peopleKeys.memberships(trialId),
    queryFn: async () => (await api<{ memberships: Membership[] }>(`/api/trials/${trialId}/memberships`)).memberships,
  });

export const useMemberships = (trialId: string) => useQuery(membershipsQueryOptions(trialId));
