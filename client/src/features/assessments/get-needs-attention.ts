import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { AttentionItem } from './types';

export type NeedsAttentionItem = AttentionItem & { patientId: string; studyId: string };
export type NeedsAttentionSite = { siteId: string; siteCode: string; siteName: string; items: NeedsAttentionItem[] };
export type NeedsAttention = { sites: NeedsAttentionSite[]; today: string };

export const needsAttentionQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: ['trials', trialId, 'needs-attention'],
    queryFn: () => api<NeedsAttention>(`/api/trials/${trialId}/needs-attention`),
  });

export const useNeedsAttention = (trialId: string) => useQuery(needsAttentionQueryOptions(trialId));
