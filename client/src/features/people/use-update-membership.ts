import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { MembershipUpdateInput } from '../../../../server/people/people.schema';
import { membershipsQueryOptions, type Membership } from './get-memberships';

export function useUpdateMembership(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ membershipId, ...input }: MembershipUpdateInput & { membershipId: string }) =>
      (await api<{ membership: Membership }>(`/api/trials/${trialId}/memberships/${membershipId}`, { method: 'PATCH', body: input })).membership,
    onSettled: () => queryClient.invalidateQueries({ queryKey: membershipsQueryOptions(trialId).queryKey }),
  });
}
