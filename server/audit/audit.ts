/** Appends to the audit trail inside the caller's transaction, so the change and its record commit together. */
import type { Knex } from 'knex';

export type AuditEntry = {
  actorUserId: string | null;
  trialId?: string | null;
  entityType: string;
  entityId: string;
  action: string;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
};

const auditRow = (entry: AuditEntry) => ({
  actor_user_id: entry.actorUserId,
  trial_id: entry.trialId ?? null,
  entity_type: entry.entityType,
  entity_id: entry.entityId,
  action: entry.action,
  before: entry.before === undefined ? null : JSON.stringify(entry.before),
  after: entry.after === undefined ? null : JSON.stringify(entry.after),
  reason: entry.reason ?? null,
});

export async function writeAudit(trx: Knex | Knex.Transaction, entry: AuditEntry): Promise<void> {
  await trx('audit_log').insert(auditRow(entry));
}

/** Many entries in one statement per thousand (a batch write, such as an import), in the order given. */
export async function writeAudits(trx: Knex | Knex.Transaction, entries: readonly AuditEntry[]): Promise<void> {
  for (let start = 0; start < entries.length; start += 1000) await trx('audit_log').insert(entries.slice(start, start + 1000).map(auditRow));
}
