/** Reads the audit trail: a trial's entries (or the installation-wide ones about sites) with the actors' e-mail addresses, filtered and paged, and one record's history. */
import type { Db } from '../db/knex.js';
import type { AuditQuery } from './audit.schema.js';

export type AuditEntry = {
  id: number;
  at: string;
  actorEmail: string | null;
  actorName: string | null;
  entityType: string;
  entityId: string;
  action: string;
  before: unknown;
  after: unknown;
  reason: string | null;
};

type AuditRow = Omit<AuditEntry, 'at'> & { at: Date };

/** Which entries a page is drawn from: one trial's (less the hidden entity types), or the installation-wide records of some types (sites). */
export type AuditScope = { trialId: string; hiddenEntityTypes: readonly string[] } | { trialId: null; entityTypes: readonly string[] };

export async function listAuditEntries(db: Db, scope: AuditScope, query: AuditQuery): Promise<{ entries: AuditEntry[]; total: number; entityTypes: string[] }> {
  const visible = db('audit_log as a').modify((q) => {
    if (scope.trialId === null) {
      q.whereNull('a.trial_id').whereIn('a.entity_type', scope.entityTypes as string[]);
    } else {
      q.where('a.trial_id', scope.trialId);
      if (scope.hiddenEntityTypes.length > 0) q.whereNotIn('a.entity_type', scope.hiddenEntityTypes as string[]);
    }
  });
  const filtered = visible
    .clone()
    .leftJoin('users as u', 'u.id', 'a.actor_user_id')
    .modify((q) => {
      if (query.entityType) q.where('a.entity_type', query.entityType);
      if (query.entityId) q.where('a.entity_id', query.entityId);
      if (query.actor) q.whereRaw(`strpos(lower(u.email), ?) > 0`, [query.actor.toLowerCase()]);
      if (query.from) q.whereRaw('a.at >= ?::date', [query.from]);
      if (query.to) q.whereRaw(`a.at < ?::date + 1`, [query.to]);
    });
  const [rows, [{ total }], types] = await Promise.all([
    filtered
      .clone()
      .orderBy([{ column: 'a.at', order: 'desc' }, { column: 'a.id', order: 'desc' }])
      .limit(query.limit)
      .offset(query.offset)
      .select(
        'a.id',
        'a.at',
        'u.email as actorEmail',
        'u.name as actorName',
        'a.entity_type as entityType',
        'a.entity_id as entityId',
        'a.action',
        'a.before',
        'a.after',
        'a.reason',
      ) as Promise<AuditRow[]>,
    filtered.clone().count({ total: '*' }) as Promise<Array<{ total: number }>>,
    visible.clone().distinct('a.entity_type').orderBy('a.entity_type') as Promise<Array<{ entity_type: string }>>,
  ]);
  return {
    entries: rows.map((row) => ({ ...row, at: row.at.toISOString() })),
    total: Number(total),
    entityTypes: types.map((t) => t.entity_type),
  };
}

/** One change to a record, with who made it. */
export type HistoryEntry = {
  id: number;
  at: string;
  action: string;
  actor: { id: string | null; email: string | null; name: string | null };
  before: unknown;
  after: unknown;
  reason: string | null;
};

/** Every audit entry about one record, oldest first. */
export async function entityHistory(db: Db, entityType: string, entityId: string): Promise<HistoryEntry[]> {
  const rows: Array<{ id: number; at: Date; action: string; actor_user_id: string | null; email: string | null; name: string | null; before: unknown; after: unknown; reason: string | null }> =
    await db('audit_log as a')
      .leftJoin('users as u', 'u.id', 'a.actor_user_id')
      .where({ 'a.entity_type': entityType, 'a.entity_id': entityId })
      .orderBy('a.id', 'asc')
      .select('a.id', 'a.at', 'a.action', 'a.actor_user_id', 'u.email', 'u.name', 'a.before', 'a.after', 'a.reason');
  return rows.map((r) => ({
    id: r.id,
    at: r.at.toISOString(),
    action: r.action,
    actor: { id: r.actor_user_id, email: r.email, name: r.name },
    before: r.before,
    after: r.after,
    reason: r.reason,
  }));
}
