/**
 * Runs a private PostgreSQL cluster on loopback for `npm start` (persistent, keyed by the
 * checkout) and for the tests (temporary, fast settings). PostgreSQL refuses to run as root, so
 * as root every server command runs as the `postgres` OS user, on a folder that user can reach.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { chownSync, existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import pg from 'pg';

const isRoot = process.getuid?.() === 0;

export type Cluster = {
  url: (database: string) => string;
  port: number;
  dataDir: string;
  stop: () => void;
  /** Fault tests: stop at once, as a crash would (no checkpoint, connections cut). */
  kill: () => void;
  /** Fault tests: start again on the same port and data after `kill` or `stop`. */
  start: () => void;
};

function findBinDir(): string | undefined {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return undefined;
  const versions = readdirSync(base)
    .filter((v) => existsSync(path.join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a));
  return versions[0] ? path.join(base, versions[0], 'bin') : undefined;
}

/** Finds the server binaries, installing Debian's package when missing and allowed to. */
export function ensurePostgresBinaries(): string {
  let bin = findBinDir();
  if (bin) return bin;
  if (!isRoot) {
    throw new Error(
      'PostgreSQL server binaries were not found under /usr/lib/postgresql. Install them with ' +
        '`sudo apt-get install -y postgresql` (Debian/Ubuntu), or set DATABASE_URL to an existing database.',
    );
  }
  console.log('[postgres] server binaries missing: installing Debian package postgresql …');
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'postgresql'], {
    stdio: 'inherit',
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
  });
  bin = findBinDir();
  if (!bin) throw new Error('apt-get installed postgresql but no initdb was found under /usr/lib/postgresql');
  return bin;
}

function run(bin: string, tool: string, args: string[], options: { allowFail?: boolean } = {}) {
  const command = isRoot ? 'runuser' : path.join(bin, tool);
  const fullArgs = isRoot ? ['-u', 'postgres', '--', path.join(bin, tool), ...args] : args;
  const result = spawnSync(command, fullArgs, { encoding: 'utf8' });
  if (result.status !== 0 && !options.allowFail) {
    throw new Error(`${tool} failed (${result.status}): ${result.stderr || result.stdout}`);
  }
  return result;
}

function prepareFolder(dir: string) {
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (isRoot) {
    const uid = Number(execFileSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).trim());
    const gid = Number(execFileSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).trim());
    chownSync(dir, uid, gid);
  }
}

export type StartOptions = {
  dataDir: string;
  port: number;
  /** Trade durability for speed: tests only, never `npm start`. */
  fast?: boolean;
};

export function startCluster({ dataDir, port, fast = false }: StartOptions): Cluster {
  const bin = ensurePostgresBinaries();
  prepareFolder(dataDir);
  const pgData = path.join(dataDir, 'data');
  if (!existsSync(path.join(pgData, 'PG_VERSION'))) {
    run(bin, 'initdb', ['-D', pgData, '-U', 'postgres', '-A', 'trust', '-E', 'UTF8', '--no-locale']);
  }
  let startedHere = false;
  const start = () => {
    const settings = [`-c listen_addresses=127.0.0.1`, `-p ${port}`, `-k ${dataDir}`, '-c max_connections=200'];
    if (fast) settings.push('-c fsync=off', '-c synchronous_commit=off', '-c full_page_writes=off');
    run(bin, 'pg_ctl', ['-D', pgData, '-l', path.join(dataDir, 'server.log'), '-w', '-t', '60', '-o', settings.join(' '), 'start']);
    startedHere = true;
  };
  const halt = (mode: 'fast' | 'immediate') => {
    if (startedHere) run(bin, 'pg_ctl', ['-D', pgData, '-m', mode, '-w', 'stop'], { allowFail: true });
    startedHere = false;
  };
  const status = run(bin, 'pg_ctl', ['-D', pgData, 'status'], { allowFail: true });
  if (status.status !== 0) start();
  const stop = () => halt('fast');
  return { url: (database) => `postgres://postgres@127.0.0.1:${port}/${database}`, port, dataDir, stop, kill: () => halt('immediate'), start };
}

/** The persistent cluster of this checkout, reachable by the postgres user. */
export function persistentDataDir(checkout: string): string {
  const key = createHash('sha1').update(checkout).digest('hex').slice(0, 10);
  return path.join('/var/tmp', `orrery-pg-${key}`);
}

export function temporaryDataDir(): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'orrery-test-pg-'));
  return dir;
}

export function removeDataDir(dir: string) {
  rmSync(dir, { recursive: true, force: true });
}

export async function ensureDatabase(adminUrl: string, database: string, options: { template?: string; owner?: string } = {}): Promise<void> {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    const found = await client.query('select 1 from pg_database where datname = $1', [database]);
    if (found.rowCount === 0) {
      const ident = client.escapeIdentifier(database);
      const template = options.template ? ` template ${client.escapeIdentifier(options.template)}` : '';
      const owner = options.owner ? ` owner ${client.escapeIdentifier(options.owner)}` : '';
      await client.query(`create database ${ident}${template}${owner}`);
    }
  } finally {
    await client.end();
  }
}

/** The role that owns the schema and runs migrations, and the role the server connects as. */
export const OWNER_ROLE = 'orrery_owner';
export const RUNTIME_ROLE = 'orrery_app';

/** The same server and database as `url`, connecting as `role` (local clusters trust loopback: no password). */
export function asRole(url: string, role: string, database?: string): string {
  const next = new URL(url);
  next.username = role;
  next.password = '';
  if (database) next.pathname = `/${database}`;
  return next.href;
}

/** Creates the owner and runtime roles once per cluster; neither may create roles or databases. */
export async function ensureRoles(adminUrl: string): Promise<void> {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    for (const role of [OWNER_ROLE, RUNTIME_ROLE]) {
      // Two test runs on one server may race to create it: the loser finds it there.
      await client.query(`do $$ begin create role ${role} login; exception when duplicate_object or unique_violation then null; end $$`);
    }
  } finally {
    await client.end();
  }
}

/**
 * A database owned by the owner role. A database made before the two roles existed (an older
 * `npm start` cluster) has its tables, functions and migration records handed to the owner.
 */
export async function ensureOwnedDatabase(adminUrl: string, database: string): Promise<void> {
  await ensureRoles(adminUrl);
  await ensureDatabase(adminUrl, database, { owner: OWNER_ROLE });
  const client = new pg.Client({ connectionString: asRole(adminUrl, new URL(adminUrl).username || 'postgres', database) });
  await client.connect();
  try {
    await client.query(`alter database ${client.escapeIdentifier(database)} owner to ${OWNER_ROLE}`);
    await client.query(`
      do $$
      declare r record;
      begin
        for r in select c.oid::regclass as name from pg_class c
                  where c.relnamespace = 'public'::regnamespace and c.relkind in ('r', 'p', 'v', 'm') and c.relowner <> '${OWNER_ROLE}'::regrole loop
          execute format('alter table %s owner to ${OWNER_ROLE}', r.name);
        end loop;
        for r in select p.oid::regprocedure as name from pg_proc p
                  where p.pronamespace = 'public'::regnamespace and p.proowner <> '${OWNER_ROLE}'::regrole
                    and not exists (select 1 from pg_depend d where d.objid = p.oid and d.deptype = 'e') loop
          execute format('alter function %s owner to ${OWNER_ROLE}', r.name);
        end loop;
      end $$`);
  } finally {
    await client.end();
  }
}
