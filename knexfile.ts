/** Knex CLI configuration, for `knex migrate:*` by hand (through tsx); `npm run migrate` also grants the runtime role its rights. */
import type { Knex } from 'knex';
import { migrationSource } from './server/db/migration-source.js';

const config: Knex.Config = {
  client: 'pg',
  connection: process.env.MIGRATION_DATABASE_URL ?? process.env.DATABASE_URL ?? 'postgres://orrery_owner@127.0.0.1:54329/orrery',
  migrations: { migrationSource },
};

export default config;
