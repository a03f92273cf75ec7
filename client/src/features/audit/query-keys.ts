import { trialKeys } from '../trials';
import type { AuditFilters } from './get-audit';

/** The audit trail's query keys: one page of a trial's entries under the filters chosen; the changes to the shared sites. */
export const auditKeys = {
  page: (trialId: string, filters: AuditFilters, page: { limit: number; offset: number }) => [...trialKeys.scope(trialId), 'audit', filters, page] as const,
  sites: () => ['audit', 'sites'] as const,
  sitesPage: (page: { limit: number; offset: number }) => [...auditKeys.sites(), page] as const,
};
