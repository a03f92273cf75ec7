import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { MembershipInviteInput } from '../../../../server/people/people.schema';
import type { Membership } from './get-memberships';
import { peopleKeys } from './query-keys';

export function useInviteMember(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: MembershipInviteInput) =>
      (await api<{ membership: Membership }>(`/api/trials/${trialId}/memberships`, { method: 'POST', body: input })).membership,
    onSuccess: () => invalidate(peopleKeys.memberships(trialId)),
  });
}
