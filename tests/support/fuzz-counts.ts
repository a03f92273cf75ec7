/**
 * Row counts of every table in the public schema (sessions excepted: signing in writes them), read
 * in one statement so the security tests can prove a refused request wrote nothing.
 */
import type { Db } from '../../server/db/knex.js';

export type TableCounts = Record<string, number>;

let cachedTables: string[] | undefined;

async function publicTables(db: Db): Promise<string[]> {
  if (!cachedTables) {
    const rows: Array<{ tablename: string }> = await db('pg_tables').where({ schemaname: 'public' }).select('tablename');
    cachedTables = rows.map((r) => r.tablename).filter((t) => t !== 'session').sort();
  }
  return cachedTables;
}

export async function tableCounts(db: Db): Promise<TableCounts> {
  const tables = await publicTables(db);
  const columns = tables.map((t) => `(select count(*) from ${JSON.stringify(t)}) as ${JSON.stringify(t)}`).join(', ');
  const { rows } = await db.raw(`select ${columns}`);
  return Object.fromEntries(Object.entries(rows[0] as Record<string, string | number>).map(([t, n]) => [t, Number(n)]));
}

/** Tables whose count differs, as "table: before → after" lines (empty when nothing changed). */
export function countChanges(before: TableCounts, after: TableCounts): string[] {
  return Object.keys({ ...before, ...after })
    .filter((t) => before[t] !== after[t])
    .map((t) => `${t}: ${before[t]} → ${after[t]}`);
}
