import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { membershipsQueryOptions } from './get-memberships';

export function useRemoveMembership(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (membershipId: string) => api<void>(`/api/trials/${trialId}/memberships/${membershipId}`, { method: 'DELETE' }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: membershipsQueryOptions(trialId).queryKey }),
  });
}
