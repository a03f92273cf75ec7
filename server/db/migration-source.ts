/**
 * Loads the TypeScript migrations in `migrations/` by importing them, which works under tsx and
 * inside vitest alike (Knex's own file loader does not under ESM).
 */
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { Knex } from 'knex';

export const migrationsDirectory = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../migrations');

type Migration = { up: (knex: Knex) => Promise<void>; down: (knex: Knex) => Promise<void> };

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations() {
    return Promise.resolve(
      readdirSync(migrationsDirectory)
        .filter((file) => /^\d+_[\w-]+\.ts$/.test(file))
        .sort(),
    );
  },
  getMigrationName(file) {
    return file;
  },
  async getMigration(file): Promise<Migration> {
    return import(pathToFileURL(path.join(migrationsDirectory, file)).href);
  },
};
