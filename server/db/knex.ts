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

/**
 * How a route's first read is run: by default `readPrepared`; a route may hand its services a
 * reader that folds more into the same statement (server/http/routes.ts, `firstReadOf`).
 */
export type FirstRead = <R>(name: string, query: Knex.QueryBuilder) => Promise<R[]>;

/**
 * Runs a read that every request makes as a named statement: PostgreSQL parses and plans it once
 * per connection instead of on every call. `query` is built by Knex as usual (outside any
 * transaction); its name must be unique to its SQL text.
 */
export async function readPrepared<R>(db: Db, name: string, query: Knex.QueryBuilder | Knex.Raw): Promise<R[]> {
  const { sql, bindings } = query.toSQL().toNative();
  const connection = (await db.client.acquireConnection()) as { query: (config: { name: string; text: string; values: readonly unknown[] }) => Promise<{ rows: R[] }> };
  try {
    return (await connection.query({ name, text: sql, values: bindings })).rows;
  } finally {
    await db.client.releaseConnection(connection);
  }
}
