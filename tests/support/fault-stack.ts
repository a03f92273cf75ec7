/**
 * A stack on its own PostgreSQL cluster, for fault tests that stop and restart the database
 * under a running server (the shared test cluster must never be stopped).
 */
import { asRole, ensureOwnedDatabase, OWNER_ROLE, removeDataDir, RUNTIME_ROLE, startCluster, temporaryDataDir, type Cluster } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';
import { migrateForRuntime } from '../../server/db/migrate.js';
import { startStackOn, type Stack, type StackOptions } from './stack.js';

export type FaultStack = { stack: Stack; cluster: Cluster; close: () => Promise<void> };

export async function startFaultStack(overrides: Record<string, string> = {}, options: StackOptions = {}): Promise<FaultStack> {
  const dataDir = temporaryDataDir();
  const cluster = startCluster({ dataDir, port: await freePort(), fast: true });
  await ensureOwnedDatabase(cluster.url('postgres'), 'orrery_faults');
  const runtimeUrl = asRole(cluster.url('postgres'), RUNTIME_ROLE, 'orrery_faults');
  await migrateForRuntime(asRole(cluster.url('postgres'), OWNER_ROLE, 'orrery_faults'), runtimeUrl);
  // The test's own connection is the cluster's superuser: it watches the server's sessions (pg_stat_activity).
  const stack = await startStackOn({ ownerUrl: cluster.url('orrery_faults'), runtimeUrl }, overrides, options);
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
