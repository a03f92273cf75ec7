/**
 * A cut's frozen rows (its patients and adverse events) are written in the transaction that
 * freezes the cut, and never after: an insert for a cut made in an earlier transaction is refused.
 * With the append-only triggers (no update, delete or truncate), a cut's content cannot change at
 * all short of disabling triggers, so a verification of its content hash can be kept; the release
 * of figures and the signed report still re-read and re-hash it every time. Frozen in time: never
 * import application code here.
 */
import type { Knex } from 'knex';

const TABLES = ['data_cut_patients', 'data_cut_adverse_events'];

export async function up(knex: Knex): Promise<void> {
  // The transaction that made the cut (existing cuts get this migration's, which is past for every writer).
  await knex.raw('alter table data_cuts add column made_in_transaction xid8 not null default pg_current_xact_id()');
  await knex.raw(`
    create function keep_cut_transaction() returns trigger language plpgsql as $$
    begin
      if new.made_in_transaction is distinct from old.made_in_transaction then
        raise exception 'a data cut is frozen: the transaction that made it cannot change';
      end if;
      return new;
    end $$`);
  await knex.raw(`
    create trigger data_cuts_keep_transaction before update on data_cuts
    for each row execute function keep_cut_transaction()`);
  await knex.raw(`
    create function reject_rows_after_freeze() returns trigger language plpgsql as $$
    begin
      if (select d.made_in_transaction from data_cuts d where d.id = new.data_cut_id) is distinct from pg_current_xact_id() then
        raise exception 'data cut % is frozen: its rows are written only when it is made', new.data_cut_id;
      end if;
      return new;
    end $$`);
  for (const table of TABLES) {
    await knex.raw(`
      create trigger ${table}_only_with_their_cut before insert on ${table}
      for each row execute function reject_rows_after_freeze()`);
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const table of TABLES) await knex.raw(`drop trigger ${table}_only_with_their_cut on ${table}`);
  await knex.raw('drop function reject_rows_after_freeze()');
  await knex.raw('drop trigger data_cuts_keep_transaction on data_cuts');
  await knex.raw('drop function keep_cut_transaction()');
  await knex.raw('alter table data_cuts drop column made_in_transaction');
}
