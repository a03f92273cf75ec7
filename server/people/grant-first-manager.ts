/**
 * `npm run grant-first-manager -- someone@your.org`: on an installation where nobody manages a
 * trial yet, lets that person create sites and trials (and so invite everyone else). Audited;
 * refused once anyone manages trials. Connects as the runtime role (DATABASE_URL).
 */
import { userInfo } from 'node:os';
import { createDb } from '../db/knex.js';
import { grantFirstManager } from './people.service.js';

const email = process.argv[2];
const url = process.env.DATABASE_URL;
if (!email || !url) {
  console.error('Usage: DATABASE_URL=postgres://… npm run grant-first-manager -- someone@your.org');
  process.exit(2);
}
const db = createDb(url);
try {
  const grant = await grantFirstManager(db, email, `command line, by ${userInfo().username}`);
  console.log(
    grant.active
      ? `${email} may now create sites and trials in Orrery.`
      : `${email} may create sites and trials from their first sign-in to Orrery.`,
  );
} catch (error) {
  console.error((error as Error).message);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
