/**
 * Two database roles: the owner, who runs the migrations and owns every table, and the runtime
 * role the server connects as, which may only read and write rows. The runtime role therefore
 * cannot alter a table, disable a trigger or drop the audit log's protection, and gets no UPDATE
 * or DELETE at all on the append-only tables (those whose rows `reject_audit_change` guards).
 */
import type { Db } from './knex.js';

/** The role named in a connection string (the user part of the URL). */
export function roleOf(connectionString: string): string {
  return decodeURIComponent(new URL(connectionString).username) || 'postgres';
}

/**
 * Gives the runtime role exactly the rights it needs on the current schema; run by the owner after
 * every migration, so tables added later are covered too.
 */
export async function grantRuntimeRights(owner: Db, runtimeRole: string): Promise<void> {
  const role = `"${runtimeRole.replace(/"/g, '""')}"`;
  const appendOnly: Array<{ table: string }> = (
    await owner.raw(`
      select distinct c.relname as "table"
        from pg_trigger t
        join pg_class c on c.oid = t.tgrelid
        join pg_proc p on p.oid = t.tgfoid
       where p.proname = 'reject_audit_change' and c.relnamespace = 'public'::regnamespace and c.relkind = 'r'
         -- a row trigger on UPDATE (tgtype bits: 1 row, 16 update); a TRUNCATE guard alone does not make a table append-only
         and t.tgtype & 1 = 1 and t.tgtype & 16 = 16`)
  ).rows;
  await owner.transaction(async (trx) => {
    await trx.raw(`grant usage on schema public to ${role}`);
    await trx.raw(`grant select, insert, update, delete on all tables in schema public to ${role}`);
    await trx.raw(`grant usage, select on all sequences in schema public to ${role}`);
    await trx.raw(`revoke all on knex_migrations, knex_migrations_lock from ${role}`);
    for (const { table } of appendOnly) await trx.raw(`revoke update, delete on "${table}" from ${role}`);
  });
}

/**
 * What the connected role could do beyond reading and writing rows; empty when it is a proper
 * runtime role. Production refuses to start otherwise.
 */
export async function runtimeRoleProblems(db: Db): Promise<string[]> {
  const [row] = (
    await db.raw(`
      select r.rolname as role, r.rolsuper as superuser, r.rolcreaterole as create_role, r.rolbypassrls as bypass_rls,
             exists (select 1 from pg_class c
                      where c.relnamespace = 'public'::regnamespace and c.relkind in ('r', 'p')
                        and pg_has_role(current_user, c.relowner, 'MEMBER')) as owns_tables
        from pg_roles r where r.rolname = current_user`)
  ).rows as Array<{ role: string; superuser: boolean; create_role: boolean; bypass_rls: boolean; owns_tables: boolean }>;
  const problems: string[] = [];
  if (row.superuser) problems.push(`the database role ${row.role} is a superuser`);
  if (row.create_role) problems.push(`the database role ${row.role} may create roles (and so grant itself the owner's)`);
  if (row.bypass_rls) problems.push(`the database role ${row.role} bypasses row security`);
  if (row.owns_tables) problems.push(`the database role ${row.role} owns the tables (or may act as their owner): it could alter them and disable their triggers`);
  return problems;
}
