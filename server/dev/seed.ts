/** `npm run seed`: builds the demo scenario in the database named by DATABASE_URL. */
import { createDb, migrateLatest } from '../db/knex.js';
import { seedDemo } from './seed/index.js';

const url = process.env.DATABASE_URL;
if (!url) {
  console.error('Set DATABASE_URL (npm start does this for its own cluster).');
  process.exit(2);
}
const db = createDb(url);
await migrateLatest(db);
await seedDemo(db);
await db.destroy();
console.log('demo data in place');
