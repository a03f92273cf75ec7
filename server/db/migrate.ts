/** Migrations run as the owner role; then the runtime role gets its rights on whatever they made. */
import { createDb, migrateLatest } from './knex.js';
import { grantRuntimeRights, roleOf } from './roles.js';

export async function migrateForRuntime(ownerUrl: string, runtimeUrl: string): Promise<void> {
  const owner = createDb(ownerUrl);
  try {
    await migrateLatest(owner);
    const runtimeRole = roleOf(runtimeUrl);
    // One role for both (a quick local setup): nothing to grant, and production refuses to start on it.
    if (runtimeRole !== roleOf(ownerUrl)) await grantRuntimeRights(owner, runtimeRole);
  } finally {
    await owner.destroy();
  }
}
