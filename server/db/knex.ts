/** The one place a Knex instance is built; statements time out rather than hang. */
import knexFactory, { type Knex } from 'knex';
import pg from 'pg';
import { migrationSource } from './migration-source.js';

// DATE columns stay 'YYYY-MM-DD' strings instead of midnight in the server's time zone.
pg.types.setTypeParser(1082, (value: string) => value);
// bigint counts fit easily in a double here.
pg.types.setTypeParser(20, (value: string) => Number(value));
// numeric (p0, p1, alpha, beta) as numbers.
pg.types.setTypeParser(1700, (value: string) => Number(value));

export type Db = Knex;

type LogSink = { warn: (message: string) => void; error: (message: string) => void };

export function createDb(connectionString: string, options: { poolMax?: number; logger?: LogSink } = {}): Db {
  const logger = options.logger;
  return knexFactory({
    client: 'pg',
    connection: {
      connectionString,
      connectionTimeoutMillis: 2000,
      statement_timeout: 15000,
      application_name: 'orrery',
    },
    pool: { min: 0, max: options.poolMax ?? 10, acquireTimeoutMillis: 2500, createTimeoutMillis: 2000 },
    acquireConnectionTimeout: 2500,
    migrations: { migrationSource },
    // Connection drops are reported as 503s by the error handler; keep Knex's own notes in the log.
    ...(logger
      ? {
          log: {
            warn: (message: unknown) => logger.warn(String(message)),
            error: (message: unknown) => logger.error(String(message)),
            deprecate: (message: unknown) => logger.warn(String(message)),
            debug: () => {},
          },
        }
      : {}),
  });
}

export async function migrateLatest(db: Db): Promise<void> {
  await db.migrate.latest({ migrationSource });
}

/** Whether the database answers a trivial query within 1.5 s (the health route's question). */
export async function databaseIsUp(db: Db): Promise<boolean> {
  try {
    await db.raw('select 1').timeout(1500, { cancel: false });
    return true;
  } catch {
    return false;
  }
}

/** A statement ready to run as a named statement: PostgreSQL parses and plans it once per connection. */
export type PreparedStatement = { name: string; text: string; values: readonly unknown[] };

type Argument = string | number | boolean | null;

/**
 * A read every request makes, written with Knex once: `build` is called a single time with a
 * marker in place of each argument, and each later call puts its arguments where the markers
 * landed in the compiled statement. So `build` must pass each argument through as a value, never
 * branch on it or change it (a marker that does not land is an error at the first call).
 */
export function preparedStatement<A extends Argument[]>(name: string, build: (db: Db, ...args: A) => Knex.QueryBuilder | Knex.Raw): (db: Db, ...args: A) => PreparedStatement {
  let compiled: { text: string; slots: Array<{ argument: number } | { constant: unknown }> } | undefined;
  return (db, ...args) => {
    if (!compiled) {
      const markers = args.map((_, i) => `\u0001orrery-argument-${i}\u0001`);
      const { sql, bindings } = build(db, ...(markers as A))
        .toSQL()
        .toNative();
      const slots = bindings.map((binding) => {
        const argument = markers.indexOf(binding as string);
        return argument >= 0 ? { argument } : { constant: binding };
      });
      const missing = markers.findIndex((_, i) => !slots.some((slot) => 'argument' in slot && slot.argument === i));
      if (missing >= 0) throw new Error(`${name}: argument ${missing} does not reach the statement as a value`);
      compiled = { text: sql, slots };
    }
    return { name, text: compiled.text, values: compiled.slots.map((slot) => ('argument' in slot ? args[slot.argument] : slot.constant)) };
  };
}

/**
 * How a route's first read is run: by default `readPrepared`; a route may hand its services a
 * reader that folds more into the same statement (server/http/routes.ts, `firstReadOf`).
 */
export type FirstRead = <R>(statement: PreparedStatement) => Promise<R[]>;

/** Runs a prepared statement outside any transaction. */
export async function readPrepared<R>(db: Db, statement: PreparedStatement): Promise<R[]> {
  const connection = (await db.client.acquireConnection()) as { query: (config: PreparedStatement) => Promise<{ rows: R[] }> };
  try {
    return (await connection.query(statement)).rows;
  } finally {
    await db.client.releaseConnection(connection);
  }
}
