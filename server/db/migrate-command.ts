/**
 * `npm run migrate`: migrates the database as the owner (`MIGRATION_DATABASE_URL`) and grants the
 * runtime role named in `DATABASE_URL` its rights on the tables.
 */
import { migrateForRuntime } from './migrate.js';

const runtimeUrl = process.env.DATABASE_URL;
const ownerUrl = process.env.MIGRATION_DATABASE_URL ?? runtimeUrl;
if (!runtimeUrl || !ownerUrl) {
  console.error('Set DATABASE_URL (the runtime role) and MIGRATION_DATABASE_URL (the owner role that runs migrations).');
  process.exit(2);
}
await migrateForRuntime(ownerUrl, runtimeUrl);
console.log('migrated; the runtime role has its rights');
