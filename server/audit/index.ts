/**
 * The Audit trail page and one record's history (writing an audit row is the shared
 * server/audit/audit.ts). Other features import this feature only through this file.
 */
export { entityHistory } from './audit.repository.js';
export type { HistoryEntry } from './audit.repository.js';
export { auditRoutes } from './audit.routes.js';
