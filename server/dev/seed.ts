/** `npm run seed`: builds the demo scenario in the database named by DATABASE_URL (migrated first, as MIGRATION_DATABASE_URL's owner when given). Never in production. */
import { createDb } from '../db/knex.js';
import { migrateForRuntime } from '../db/migrate.js';
import { seedDemo } from './seed/index.js';

const url = process.env.DATABASE_URL;
if (!url) {
  console.error('Set DATABASE_URL (npm start does this for its own cluster).');
  process.exit(2);
}
if (process.env.NODE_ENV === 'production') {
  console.error('The demo scenario is never seeded in production (NODE_ENV=production).');
  process.exit(2);
}
await migrateForRuntime(process.env.MIGRATION_DATABASE_URL ?? url, url);
const db = createDb(url);
await seedDemo(db);
await db.destroy();
console.log('demo data in place');
