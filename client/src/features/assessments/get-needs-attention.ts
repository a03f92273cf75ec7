import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { assessmentKeys } from './query-keys';
import type { AttentionItem } from './types';

export type NeedsAttentionItem = AttentionItem & { patientId: string; studyId: string };
export type NeedsAttentionSite = { siteId: string; siteCode: string; siteName: string; items: NeedsAttentionItem[] };
export type NeedsAttention = { sites: NeedsAttentionSite[]; today: string };

export const needsAttentionQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: assessmentKeys.needsAttention(trialId),
    queryFn: () => api<NeedsAttention>(`/api/trials/${trialId}/needs-attention`),
  });

export const useNeedsAttention = (trialId: string) => useQuery(needsAttentionQueryOptions(trialId));
