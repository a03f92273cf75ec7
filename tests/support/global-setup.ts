/**
 * Runs once per `vitest run`: a temporary PostgreSQL cluster on loopback (fast, throw-away
 * settings) with the owner and runtime roles, and a template database migrated by the owner, with
 * the runtime role's rights granted, that every test file copies for itself.
 * With DATABASE_URL set (a superuser's URL), that server is used instead and no cluster is started.
 */
import type { TestProject } from 'vitest/node';
import { asRole, ensureOwnedDatabase, OWNER_ROLE, removeDataDir, RUNTIME_ROLE, startCluster, temporaryDataDir } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';
import { migrateForRuntime } from '../../server/db/migrate.js';

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
  await ensureOwnedDatabase(base.href, TEMPLATE_DATABASE);
  await migrateForRuntime(asRole(base.href, OWNER_ROLE, TEMPLATE_DATABASE), asRole(base.href, RUNTIME_ROLE, TEMPLATE_DATABASE));
  project.provide('pgAdminUrl', base.href);
  return () => teardownCluster();
}

declare module 'vitest' {
  export interface ProvidedContext {
    pgAdminUrl: string;
  }
}
