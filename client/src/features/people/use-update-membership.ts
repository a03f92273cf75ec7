import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { MembershipUpdateInput } from '../../../../server/people/people.schema';
import type { Membership } from './get-memberships';
import { peopleKeys } from './query-keys';

export function useUpdateMembership(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async ({ membershipId, ...input }: MembershipUpdateInput & { membershipId: string }) =>
      (await api<{ membership: Membership }>(`/api/trials/${trialId}/memberships/${membershipId}`, { method: 'PATCH', body: input })).membership,
    onSettled: () => invalidate(peopleKeys.memberships(trialId)),
  });
}
