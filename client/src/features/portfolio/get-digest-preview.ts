import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { portfolioKeys } from './query-keys';

export type DigestPreview = { period: string; to: string; subject: string; text: string };

/** Development only: the weekly digest this user would receive, rendered without sending. */
export const digestPreviewQueryOptions = () =>
  queryOptions({
    queryKey: portfolioKeys.digestPreview(),
    queryFn: async () => (await api<{ preview: DigestPreview | null }>('/api/dev/digest-preview')).preview,
  });

export const useDigestPreview = (enabled: boolean) => useQuery({ ...digestPreviewQueryOptions(), enabled });
