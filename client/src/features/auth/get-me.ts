import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, ApiError } from '../../lib/api';
import type { Role } from '../../lib/roles';
import type { SigningAction } from '../../../../server/signatures/signatures';

export type Membership = { id: string; trialId: string; trialCode: string; role: Role; siteId: string | null; siteCode: string | null };
export type Me = {
  user: { id: string; email: string; name: string | null };
  memberships: Membership[];
  /** May create sites and trials before managing one (the installation's first trial manager). */
  trialManager: boolean;
  /** Signatures this session has entered the password for and may now make. */
  signingReady: Array<{ action: SigningAction; subjectId: string; expiresAt: string }>;
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

/** Every role the user holds on some trial; a first trial manager counts as admin. */
export const allRoles = (me: Me | null | undefined): Role[] => [
  ...new Set([...(me?.memberships ?? []).map((m) => m.role), ...(me?.trialManager ? (['admin'] as const) : [])]),
];

/** Whether the password for this signature has been entered in this session and not yet used. */
export function useSigningReady(action: SigningAction, subjectId: string): boolean {
  const { data: me } = useMe();
  return (me?.signingReady ?? []).some((ready) => ready.action === action && ready.subjectId === subjectId);
}
