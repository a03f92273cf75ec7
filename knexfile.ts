/** Knex CLI configuration: `npm run migrate` (runs through tsx, see package.json). */
import type { Knex } from 'knex';
import { migrationSource } from './server/db/migration-source.js';

const config: Knex.Config = {
  client: 'pg',
  connection: process.env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/orrery',
  migrations: { migrationSource },
};

export default config;
