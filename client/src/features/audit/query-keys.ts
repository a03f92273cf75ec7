import { trialKeys } from '../trials';
import type { AuditFilters } from './get-audit';

/** The audit trail's query key: one page of a trial's entries under the filters chosen. */
export const auditKeys = {
  page: (trialId: string, filters: AuditFilters, page: { limit: number; offset: number }) => [...trialKeys.scope(trialId), 'audit', filters, page] as const,
};
