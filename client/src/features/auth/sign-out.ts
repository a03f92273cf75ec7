import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api<{ redirectTo: string }>('/auth/logout', { method: 'POST' }),
    onSuccess: ({ redirectTo }) => {
      queryClient.clear();
      window.location.assign(redirectTo || '/');
    },
  });
}
