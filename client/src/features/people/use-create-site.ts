import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { SiteInput } from '../../../../server/people/people.schema';
import { auditKeys } from '../audit';
import type { Site } from './get-sites';
import { peopleKeys } from './query-keys';

export function useCreateSite() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: SiteInput) => (await api<{ site: Site }>('/api/sites', { method: 'POST', body: input })).site,
    // The new site joins the list and the sites' audit trail.
    onSuccess: () => invalidate(peopleKeys.sites(), auditKeys.sites()),
  });
}
