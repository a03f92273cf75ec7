import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { SiteUpdateInput } from '../../../../server/people/people.schema';
import { trialsQueryOptions } from '../trials';
import { sitesQueryOptions, type Site } from './get-sites';

export function useUpdateSite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ siteId, ...input }: SiteUpdateInput & { siteId: string }) =>
      (await api<{ site: Site }>(`/api/sites/${siteId}`, { method: 'PATCH', body: input })).site,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: sitesQueryOptions().queryKey });
      // Trial pages show site codes too.
      await queryClient.invalidateQueries({ queryKey: trialsQueryOptions().queryKey });
    },
  });
}
