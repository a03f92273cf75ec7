import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { AuditEntry } from '../../../../server/audit/audit.repository';
import { auditKeys } from './query-keys';

export type { AuditEntry };

export type AuditPage = {
  entries: AuditEntry[];
  total: number;
  entityTypes: string[];
  limit: number;
  offset: number;
  patientLevelHidden: boolean;
};

export type AuditFilters = { entityType?: string; entityId?: string; actor?: string; from?: string; to?: string };

export const auditQueryOptions = (trialId: string, filters: AuditFilters, page: { limit: number; offset: number }) => {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries({ ...filters, limit: String(page.limit), offset: String(page.offset) })) if (value) params.set(key, value);
  return queryOptions({
    queryKey: auditKeys.page(trialId, filters, page),
    queryFn: () => api<AuditPage>(`/api/trials/${trialId}/audit?${params}`),
    // Every write anywhere in the trial adds entries, and no write names the trail: read it afresh each time it is shown.
    staleTime: 0,
    placeholderData: keepPreviousData,
  });
};

export const useAudit = (trialId: string, filters: AuditFilters, page: { limit: number; offset: number }) =>
  useQuery(auditQueryOptions(trialId, filters, page));
