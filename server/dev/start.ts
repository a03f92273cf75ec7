/**
 * `npm start`: a complete local Orrery from a fresh clone. Starts (or reuses) this checkout's
 * PostgreSQL cluster on 127.0.0.1:54329 with its two roles (the owner migrates, the server runs as
 * the runtime role, as in production), migrates and seeds the demo, builds the client, starts the
 * mail catcher and the identity provider, and serves the app on http://localhost:3000.
 * Ctrl-C stops everything it started, the cluster included; the data stays for next time.
 * Development only: it refuses to run with NODE_ENV=production (demo data, local identity provider).
 */
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { pino } from 'pino';
import { asRole, ensureOwnedDatabase, OWNER_ROLE, persistentDataDir, RUNTIME_ROLE, startCluster, type Cluster } from './postgres.js';
import { startMailCatcher } from './mail-catcher.js';
import { startIdp } from '../../fake-idp/provider.js';
import { createDb } from '../db/knex.js';
import { migrateForRuntime } from '../db/migrate.js';
import { seedDemo } from './seed/index.js';
import { loadConfig } from '../config.js';
import { startServer } from '../server.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const logger = pino({ level: process.env.LOG_LEVEL ?? 'info', transport: undefined });
const appPort = Number(process.env.PORT ?? 3000);
const idpPort = Number(process.env.IDP_PORT ?? 3001);
const smtpPort = Number(process.env.SMTP_PORT ?? 2525);
const catcherHttpPort = Number(process.env.MAIL_CATCHER_PORT ?? 3025);
const pgPort = Number(process.env.PGPORT_LOCAL ?? 54329);
const appOrigin = process.env.APP_ORIGIN ?? `http://localhost:${appPort}`;

const cleanups: Array<() => Promise<void> | void> = [];
let stopping = false;
async function stopAll(code: number) {
  if (stopping) return;
  stopping = true;
  for (const cleanup of cleanups.reverse()) {
    try {
      await cleanup();
    } catch (error) {
      console.error('while stopping:', (error as Error).message);
    }
  }
  process.exit(code);
}
process.on('SIGINT', () => void stopAll(0));
process.on('SIGTERM', () => void stopAll(0));

try {
  if (process.env.NODE_ENV === 'production') {
    throw new Error('npm start runs the local demo (invented data, local identity provider) and refuses NODE_ENV=production. In production run `npm run build` and `node --import tsx server/main.ts` (see README).');
  }
  let databaseUrl = process.env.DATABASE_URL;
  let migrationUrl = process.env.MIGRATION_DATABASE_URL ?? databaseUrl;
  if (!databaseUrl || !migrationUrl) {
    const dataDir = persistentDataDir(root);
    console.log(`[postgres] cluster in ${dataDir}, port ${pgPort}`);
    const cluster: Cluster = startCluster({ dataDir, port: pgPort });
    cleanups.push(() => cluster.stop());
    await ensureOwnedDatabase(cluster.url('postgres'), 'orrery');
    migrationUrl = asRole(cluster.url('orrery'), OWNER_ROLE);
    databaseUrl = asRole(cluster.url('orrery'), RUNTIME_ROLE);
  }

  await migrateForRuntime(migrationUrl, databaseUrl);
  const db = createDb(databaseUrl);
  await seedDemo(db);
  await db.destroy();
  console.log('[db] migrated and demo data in place');

  if (process.env.SKIP_CLIENT_BUILD !== '1') {
    console.log('[client] building …');
    execFileSync(process.execPath, [path.join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], {
      cwd: root,
      stdio: 'inherit',
    });
  }

  const catcher = await startMailCatcher({ smtpPort, httpPort: catcherHttpPort });
  cleanups.push(() => catcher.close());
  const idp = await startIdp({ port: idpPort, appOrigins: [appOrigin] });
  cleanups.push(() => idp.close());

  const config = loadConfig({
    ...process.env,
    DATABASE_URL: databaseUrl,
    SESSION_SECRET: process.env.SESSION_SECRET ?? 'local-development-only-session-secret-0000',
    APP_ORIGIN: appOrigin,
    PORT: String(appPort),
    OIDC_ISSUER: idp.issuer,
    SMTP_PORT: String(catcher.smtpPort),
    MAIL_CATCHER_URL: catcher.httpUrl,
    SERVE_CLIENT_FROM: path.join(root, 'dist/client'),
  });
  const server = await startServer(config, logger);
  cleanups.push(() => server.close());

  console.log(`
  Orrery is running:           ${appOrigin}
  Identity provider (local):   ${idp.issuer}
  Mail catcher (SMTP ${catcher.smtpPort}):     ${catcher.httpUrl}/messages  (or the Outbox page)

  Demo accounts, password "demo":
    ada.admin@tessaly.test (admin)            sam.stat@tessaly.test (statistician)
    cora.coord@tessaly.test (coordinator RVG) ivan.inv@tessaly.test (investigator HCC)
    mona.monitor@tessaly.test (monitor)       spencer.sponsor@tessaly.test (sponsor)

  Ctrl-C stops everything.
`);
} catch (error) {
  console.error((error as Error).message);
  await stopAll(1);
}
