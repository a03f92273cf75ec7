import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { SiteInput } from '../../../../server/people/people.schema';
import { sitesQueryOptions, type Site } from './get-sites';

export function useCreateSite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (input: SiteInput) => (await api<{ site: Site }>('/api/sites', { method: 'POST', body: input })).site,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sitesQueryOptions().queryKey }),
  });
}
