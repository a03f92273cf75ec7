/** What other features use of the audit trail: the changes to the shared sites and their query key. */
export { SiteChangesPanel } from './site-changes-panel';
export { auditKeys } from './query-keys';
