/**
 * Runs once per `vitest run`: a temporary PostgreSQL cluster on loopback (fast, throw-away
 * settings) with a migrated template database that every test file copies for itself.
 * With DATABASE_URL set, that server is used instead and no cluster is started.
 */
import type { TestProject } from 'vitest/node';
import { ensureDatabase, removeDataDir, startCluster, temporaryDataDir } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';
import { createDb, migrateLatest } from '../../server/db/knex.js';

export const TEMPLATE_DATABASE = 'orrery_test_template';

export default async function setup(project: TestProject) {
  let adminUrl = process.env.DATABASE_URL;
  let teardownCluster = () => {};
  if (!adminUrl) {
    const dataDir = temporaryDataDir();
    const cluster = startCluster({ dataDir, port: await freePort(), fast: true });
    teardownCluster = () => {
      cluster.stop();
      removeDataDir(dataDir);
    };
    adminUrl = cluster.url('postgres');
  }
  const base = new URL(adminUrl);
  base.pathname = '/postgres';
  await ensureDatabase(base.href, TEMPLATE_DATABASE);
  base.pathname = `/${TEMPLATE_DATABASE}`;
  const db = createDb(base.href);
  await migrateLatest(db);
  await db.destroy();
  base.pathname = '/postgres';
  project.provide('pgAdminUrl', base.href);
  return () => teardownCluster();
}

declare module 'vitest' {
  export interface ProvidedContext {
    pgAdminUrl: string;
  }
}
