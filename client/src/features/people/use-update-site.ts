import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { SiteUpdateInput } from '../../../../server/people/people.schema';
import { trialKeys } from '../trials';
import { auditKeys } from '../audit';
import type { Site } from './get-sites';
import { peopleKeys } from './query-keys';

export function useUpdateSite() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async ({ siteId, ...input }: SiteUpdateInput & { siteId: string }) =>
      (await api<{ site: Site }>(`/api/sites/${siteId}`, { method: 'PATCH', body: input })).site,
    // Every trial's pages show site codes and names too; the change joins the sites' audit trail.
    onSuccess: () => invalidate(peopleKeys.sites(), trialKeys.all(), auditKeys.sites()),
  });
}
