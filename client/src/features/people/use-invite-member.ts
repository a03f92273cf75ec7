import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { MembershipInviteInput } from '../../../../server/people/people.schema';
import { membershipsQueryOptions, type Membership } from './get-memberships';

export function useInviteMember(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: MembershipInviteInput) =>
      (await api<{ membership: Membership }>(`/api/trials/${trialId}/memberships`, { method: 'POST', body: input })).membership,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membershipsQueryOptions(trialId).queryKey }),
  });
}
