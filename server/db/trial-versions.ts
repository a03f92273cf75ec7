/**
 * Summaries kept in memory, keyed by a trial's data version. The database moves a trial's version
 * on in the same transaction as any change to its patients, cohorts, designs, sites or trial row
 * (migration 20261216000100_trial_data_versions), so a summary stored under the version read in
 * the same snapshot as its data is exact for every later read that finds that version: a committed
 * write is seen by the next read, in every server process, and nothing is ever invalidated by hand.
 */
import type { Knex } from 'knex';
import type { Db } from './knex.js';

type Conn = Db | Knex.Transaction;

/** The trials' current data versions (0 for a trial never changed since versions began). */
export async function trialDataVersions(db: Conn, trialIds: readonly string[]): Promise<Map<string, number>> {
  const versions = new Map<string, number>(trialIds.map((id) => [id, 0]));
  if (trialIds.length === 0) return versions;
  const rows: Array<{ trial_id: string; version: number }> = await db('trial_data_versions').whereIn('trial_id', [...trialIds]).select('trial_id', 'version');
  for (const row of rows) versions.set(row.trial_id, Number(row.version));
  return versions;
}

export async function trialDataVersion(db: Conn, trialId: string): Promise<number> {
  return (await trialDataVersions(db, [trialId])).get(trialId) as number;
}

/**
 * The version a request's summaries are looked up by: the one read with the caller's membership at
 * the start of the request when there is one (a write committed before the request is in it), else read now.
 * For reads only: a handler that writes and then reads must read the version again.
 */
export async function currentDataVersion(db: Conn, access: { trialId: string; dataVersion?: number }): Promise<number> {
  return access.dataVersion ?? (await trialDataVersion(db, access.trialId));
}

/** Runs `work` in one read-only snapshot, so every query in it (the version first) sees the same committed data. */
export function inOneSnapshot<T>(db: Db, work: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  return db.transaction(work, { isolationLevel: 'repeatable read', readOnly: true });
}

/** A value shared between requests is frozen, so no reader can change what the next one gets. */
export function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const inner of Object.values(value)) deepFreeze(inner);
  }
  return value;
}

/** The frozen value kept under `key` in `kept`, made and frozen the first time it is asked for (the answers kept beside a summary, one per kind of viewer). */
export function keptFrozen<T>(kept: Map<string, T>, key: string, make: () => T): T {
  let value = kept.get(key);
  if (value === undefined) kept.set(key, (value = deepFreeze(make())));
  return value;
}

/**
 * A bounded map of summaries, each stored with the version it was computed at; a lookup with
 * another version misses. The oldest entries go first when it is full.
 */
export class VersionedCache<T> {
  private readonly entries = new Map<string, { version: number; value: T }>();

  constructor(private readonly capacity: number) {}

  get(key: string, version: number): T | undefined {
    const entry = this.entries.get(key);
    return entry && entry.version === version ? entry.value : undefined;
  }

  set(key: string, version: number, value: T): void {
    const current = this.entries.get(key);
    // Of two requests computing at once, the one that saw the newer data wins.
    if (current && current.version > version) return;
    this.entries.delete(key);
    this.entries.set(key, { version, value });
    if (this.entries.size > this.capacity) this.entries.delete(this.entries.keys().next().value as string);
  }
}
