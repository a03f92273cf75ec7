/**
 * A stack on its own PostgreSQL cluster, for fault tests that stop and restart the database
 * under a running server (the shared test cluster must never be stopped).
 */
import { ensureDatabase, removeDataDir, startCluster, temporaryDataDir, type Cluster } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';
import { createDb, migrateLatest } from '../../server/db/knex.js';
import { startStackOn, type Stack, type StackOptions } from './stack.js';

export type FaultStack = { stack: Stack; cluster: Cluster; close: () => Promise<void> };

export async function startFaultStack(overrides: Record<string, string> = {}, options: StackOptions = {}): Promise<FaultStack> {
  const dataDir = temporaryDataDir();
  const cluster = startCluster({ dataDir, port: await freePort(), fast: true });
  await ensureDatabase(cluster.url('postgres'), 'orrery_faults');
  const migrator = createDb(cluster.url('orrery_faults'));
  await migrateLatest(migrator);
  await migrator.destroy();
  const stack = await startStackOn(cluster.url('orrery_faults'), overrides, options);
  return {
    stack,
    cluster,
    close: async () => {
      await stack.close();
      cluster.stop();
      removeDataDir(dataDir);
    },
  };
}
