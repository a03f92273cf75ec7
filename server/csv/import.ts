/**
 * The transaction skeleton every CSV import shares. The rows are applied inside one transaction;
 * the importer's `apply` reports each row, opening a savepoint where a row's write can be refused
 * by the database (or, for the patients' new rows, checking them all before one batch write), so a
 * bad row is reported without hiding the others. A dry run, or a commit with any bad row, rolls the whole transaction back: the
 * dry run shows exactly what the commit would do, and a commit is all-or-nothing (422 with the
 * report when a row fails).
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { AppError } from '../http/errors.js';

export type RowOutcome = 'new' | 'update' | 'unchanged' | 'error';
export type ImportCounts = Record<RowOutcome, number> & { total: number };
export type ImportedRow = { result: RowOutcome };

/** A row refused with its reasons, column by column. */
export class RowError<E> extends Error {
  constructor(readonly errors: E[]) {
    super('row error');
  }
}

/** Thrown inside the transaction to undo it on purpose; never leaves runImport. */
class RollBack extends Error {}

/**
 * Runs `apply` in one transaction; it reports each row through `add` and returns what else the
 * report says (computed before the transaction ends, so a dry run sees the effects it undoes).
 */
export async function runImport<R extends ImportedRow, X extends object>(
  db: Db,
  options: { dryRun: boolean; total: number },
  apply: (trx: Knex.Transaction, add: (row: R) => void) => Promise<X>,
): Promise<{ dryRun: boolean; committed: boolean; counts: ImportCounts; rows: R[] } & X> {
  const counts: ImportCounts = { total: options.total, new: 0, update: 0, unchanged: 0, error: 0 };
  const rows: R[] = [];
  const add = (row: R) => {
    rows.push(row);
    counts[row.result] += 1;
  };
  let extra = {} as X;
  let committed = false;
  try {
    await db.transaction(async (trx) => {
      extra = await apply(trx, add);
      if (options.dryRun || counts.error > 0) throw new RollBack();
      committed = true;
    });
  } catch (error) {
    if (!(error instanceof RollBack)) throw error;
  }
  if (!options.dryRun && counts.error > 0) {
    throw new AppError(422, 'import_rejected', `${counts.error} of ${counts.total} rows have errors, so nothing was imported. Fix them and import again.`, {
      counts,
      rows,
    });
  }
  return { dryRun: options.dryRun, committed, counts, rows, ...extra };
}
