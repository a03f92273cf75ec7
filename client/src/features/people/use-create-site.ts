import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { SiteInput } from '../../../../server/people/people.schema';
import type { Site } from './get-sites';
import { peopleKeys } from './query-keys';

export function useCreateSite() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: SiteInput) => (await api<{ site: Site }>('/api/sites', { method: 'POST', body: input })).site,
    onSuccess: () => invalidate(peopleKeys.sites()),
  });
}
