import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import { peopleKeys } from './query-keys';

export function useRemoveMembership(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (membershipId: string) => api<void>(`/api/trials/${trialId}/memberships/${membershipId}`, { method: 'DELETE' }),
    onSettled: () => invalidate(peopleKeys.memberships(trialId)),
  });
}
