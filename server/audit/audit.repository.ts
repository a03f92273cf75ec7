/** Reads a trial's audit trail with the actors' e-mail addresses, filtered and paged. */
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

export async function listAuditEntries(
  db: Db,
  trialId: string,
  query: AuditQuery,
  options: { hiddenEntityTypes: readonly string[] },
): Promise<{ entries: AuditEntry[]; total: number; entityTypes: string[] }> {
  const visible = db('audit_log as a')
    .where('a.trial_id', trialId)
    .modify((q) => {
      if (options.hiddenEntityTypes.length > 0) q.whereNotIn('a.entity_type', options.hiddenEntityTypes as string[]);
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
