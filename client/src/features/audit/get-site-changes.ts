import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { AuditEntry } from './get-audit';
import { auditKeys } from './query-keys';

export type SiteChangesPage = { entries: AuditEntry[]; total: number; limit: number; offset: number };

/** Changes to the shared list of sites (which belongs to no one trial), for trial managers. */
export const siteChangesQueryOptions = (page: { limit: number; offset: number }) =>
  queryOptions({
    queryKey: auditKeys.sitesPage(page),
    queryFn: () => api<SiteChangesPage>(`/api/audit/sites?limit=${page.limit}&offset=${page.offset}`),
    placeholderData: keepPreviousData,
  });

export const useSiteChanges = (page: { limit: number; offset: number }) => useQuery(siteChangesQueryOptions(page));
