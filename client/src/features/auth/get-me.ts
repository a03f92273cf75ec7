import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, ApiError } from '../../lib/api';
import type { Role } from '../../lib/roles';

export type Membership = { id: string; trialId: string; trialCode: string; role: Role; siteId: string | null; siteCode: string | null };
export type Me = {
  user: { id: string; email: string; name: string | null };
  memberships: Membership[];
  authenticatedAt: string | null;
  environment: { development: boolean; outbox: boolean };
};

/** The query key of who is signed in. */
export const authKeys = {
  me: () => ['me'] as const,
};

/** The signed-in user, or null when nobody is signed in. */
export const meQueryOptions = () =>
  queryOptions({
    queryKey: authKeys.me(),
    queryFn: async (): Promise<Me | null> => {
      try {
        return await api<Me>('/api/me');
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
    staleTime: 60_000,
  });

export const useMe = () => useQuery(meQueryOptions());

export const allRoles = (me: Me | null | undefined): Role[] => [...new Set((me?.memberships ?? []).map((m) => m.role))];
