/**
 * One test file's own Orrery: a fresh database copied from the migrated template, the local
 * identity provider, the mail catcher and a real server process on loopback ports. The server
 * connects as the runtime role (rows only); the test's own connection, for arranging rows and
 * checking what was written, is the owner's.
 */
import { randomBytes } from 'node:crypto';
import { inject } from 'vitest';
import pg from 'pg';
import { pino, type Logger } from 'pino';
import { startIdp, type IdpQuirks, type RunningIdp } from '../../fake-idp/provider.js';
import { asRole, OWNER_ROLE, RUNTIME_ROLE } from '../../server/dev/postgres.js';
import { startMailCatcher, type RunningCatcher } from '../../server/dev/mail-catcher.js';
import { freePort } from '../../server/dev/ports.js';
import { createDb, type Db } from '../../server/db/knex.js';
import { loadConfig, type Config } from '../../server/config.js';
import { startServer, type RunningServer } from '../../server/server.js';
import { signIn, type Session } from './sign-in.js';

const TEMPLATE = 'orrery_test_template';

/** A test database: the owner's URL (arranging rows) and the runtime role's (what the server uses). */
export type TestDatabase = { ownerUrl: string; runtimeUrl: string };

export async function createTestDatabase(): Promise<TestDatabase> {
  const adminUrl = inject('pgAdminUrl');
  const name = `orrery_test_${randomBytes(6).toString('hex')}`;
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    for (let attempt = 0; ; attempt += 1) {
      try {
        await client.query(`create database ${name} template ${TEMPLATE}`);
        break;
      } catch (error) {
        // Two files copying the template at the same instant: wait and try again.
        if (attempt > 20 || !/being accessed by other users/.test((error as Error).message)) throw error;
        await new Promise((resolve) => setTimeout(resolve, 100 + Math.random() * 200));
      }
    }
  } finally {
    await client.end();
  }
  return { ownerUrl: asRole(adminUrl, OWNER_ROLE, name), runtimeUrl: asRole(adminUrl, RUNTIME_ROLE, name) };
}

export type Stack = {
  url: string;
  config: Config;
  /** Direct database access for arranging rows and checking what was written. */
  db: Db;
  server: RunningServer;
  idp: RunningIdp;
  catcher: RunningCatcher;
  signIn: (email: string) => Promise<Session>;
  /** A second server process on the same database (sessions and jobs are shared). */
  startSecondServer: () => Promise<RunningServer>;
  close: () => Promise<void>;
};

export type StackOptions = {
  /** Where the servers log (tests that read the logs pass their own); silent by default. */
  logger?: Logger;
  /** How the local identity provider departs from the standard, to show what the server refuses. */
  idp?: IdpQuirks;
};

export async function startStack(overrides: Record<string, string> = {}, options: StackOptions = {}): Promise<Stack> {
  return startStackOn(await createTestDatabase(), overrides, options);
}

/** The same stack on a database the caller provides (fault tests bring their own cluster; one URL serves both roles). */
export async function startStackOn(database: string | TestDatabase, overrides: Record<string, string> = {}, options: StackOptions = {}): Promise<Stack> {
  const { ownerUrl, runtimeUrl } = typeof database === 'string' ? { ownerUrl: database, runtimeUrl: database } : database;
  const [appPort, idpPort, secondPort] = [await freePort(), await freePort(), await freePort()];
  const appOrigin = `http://localhost:${appPort}`;
  const catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0 });
  const idp = await startIdp({ port: idpPort, appOrigins: [appOrigin, `http://localhost:${secondPort}`], quirks: options.idp });
  const env = (port: number, origin: string) => ({
    DATABASE_URL: runtimeUrl,
    SESSION_SECRET: 'test-session-secret-test-session-secret',
    APP_ORIGIN: origin,
    PORT: String(port),
    OIDC_ISSUER: idp.issuer,
    SMTP_PORT: String(catcher.smtpPort),
    MAIL_CATCHER_URL: catcher.httpUrl,
    MAIL_POLL_MS: '200',
    MAIL_RETRY_BASE_MS: '200',
    JOBS_ENABLED: 'false',
    LOG_LEVEL: 'silent',
    ...overrides,
  });
  const config = loadConfig(env(appPort, appOrigin));
  const logger = options.logger ?? pino({ level: 'silent' });
  const server = await startServer(config, logger);
  const db = createDb(ownerUrl, { poolMax: 4 });
  const extra: RunningServer[] = [];
  return {
    url: server.url,
    config,
    db,
    server,
    idp,
    catcher,
    signIn: (email) => signIn(server.url, email),
    startSecondServer: async () => {
      const second = await startServer(loadConfig(env(secondPort, `http://localhost:${secondPort}`)), logger);
      extra.push(second);
      return second;
    },
    close: async () => {
      for (const s of extra) await s.close();
      await server.close();
      await db.destroy();
      await idp.close();
      await catcher.close();
    },
  };
}

/** Waits until `check` returns a truthy value, polling; fails after `timeoutMs`. */
export async function eventually<T>(check: () => Promise<T | undefined | false> | T | undefined | false, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > deadline) throw new Error('condition not met in time');
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}
