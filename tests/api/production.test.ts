/**
 * Production mode (NODE_ENV=production) refuses to start on unsafe settings, with the demo or with
 * the local identity provider; and the database role the server runs as can only read and write
 * rows — it cannot alter a table, disable a trigger or touch the audit log's history.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import pg from 'pg';
import { pino } from 'pino';
import { createTestDatabase, type TestDatabase } from '../support/stack.js';
import { loadConfig } from '../../server/config.js';
import { startServer } from '../../server/server.js';
import { createDb } from '../../server/db/knex.js';
import { seedDemo } from '../../server/dev/seed/index.js';

const run = promisify(execFile);

/** Runs a TypeScript entry point as its own process; resolves with its exit code and output. */
async function processExit(script: string, env: Record<string, string>): Promise<{ code: number; output: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, ['--import', 'tsx', script], { env: { PATH: process.env.PATH ?? '', ...env }, timeout: 60_000 });
    return { code: 0, output: stdout + stderr };
  } catch (error) {
    const failed = error as { code: number; stdout: string; stderr: string };
    return { code: failed.code, output: failed.stdout + failed.stderr };
  }
}

let database: TestDatabase;

beforeAll(async () => {
  database = await createTestDatabase();
}, 60_000);

const PRODUCTION = {
  NODE_ENV: 'production',
  SESSION_SECRET: 'a-production-secret-of-at-least-32-characters',
  APP_ORIGIN: 'https://orrery.example.org',
  OIDC_ISSUER: 'https://sign-in.example.org',
  PORT: '0',
  LOG_LEVEL: 'silent',
  JOBS_ENABLED: 'false',
};

describe('starting in production mode', () => {
  it('when the server process starts with an http origin, the local identity provider and a short secret, then it exits with every problem named', async () => {
    const { code, output } = await processExit('server/main.ts', {
      NODE_ENV: 'production',
      DATABASE_URL: database.runtimeUrl,
      SESSION_SECRET: 'short',
      APP_ORIGIN: 'http://orrery.example.org',
      OIDC_ISSUER: 'http://localhost:3001',
    });
    expect(code).toBe(2);
    expect(output).toMatch(/SESSION_SECRET must be at least 32 characters/);
    expect(output).toMatch(/APP_ORIGIN must be the https address/);
    expect(output).toMatch(/OIDC_ISSUER must be your organisation’s OpenID provider over https/);
    expect(output).toMatch(/local identity provider stands in for development only/);
  }, 60_000);

  it('when the server would connect as the role that owns the tables, then it refuses to start; as the runtime role it starts', async () => {
    const logger = pino({ level: 'silent' });
    await expect(startServer(loadConfig({ ...PRODUCTION, DATABASE_URL: database.ownerUrl }), logger)).rejects.toThrow(/owns the tables/);
    const server = await startServer(loadConfig({ ...PRODUCTION, DATABASE_URL: database.runtimeUrl }), logger);
    await server.close();
  });

  it('when the demo would be seeded, the local start run or the local identity provider started in production mode, then each refuses', async () => {
    const seed = await processExit('server/dev/seed.ts', { NODE_ENV: 'production', DATABASE_URL: database.runtimeUrl });
    expect(seed).toMatchObject({ code: 2, output: expect.stringMatching(/never seeded in production/) });
    const start = await processExit('server/dev/start.ts', { NODE_ENV: 'production' });
    expect(start).toMatchObject({ code: 1, output: expect.stringMatching(/refuses NODE_ENV=production/) });
    const idp = await processExit('fake-idp/main.ts', { NODE_ENV: 'production', IDP_PORT: '0' });
    expect(idp.code).not.toBe(0);
    expect(idp.output).toMatch(/local identity provider stands in for development and tests only/);

    const db = createDb(database.runtimeUrl);
    const previous = process.env.NODE_ENV;
    process.env.NODE_ENV = 'production';
    try {
      await expect(seedDemo(db)).rejects.toThrow(/never seeded in production/);
      expect(await db('users').first()).toBeUndefined();
    } finally {
      process.env.NODE_ENV = previous;
      await db.destroy();
    }
  }, 120_000);
});

describe('the runtime database role', () => {
  let client: pg.Client;
  beforeAll(async () => {
    client = new pg.Client({ connectionString: database.runtimeUrl });
    await client.connect();
  });
  afterAll(async () => client?.end());

  it('when the runtime role tries to disable a trigger, alter a table or change the audit log, then PostgreSQL refuses', async () => {
    await client.query(`insert into audit_log (entity_type, entity_id, action) values ('test', 'x', 'written')`);
    const refusals: Array<[string, RegExp]> = [
      ['alter table audit_log disable trigger audit_log_append_only', /must be owner/],
      ['alter table signatures disable trigger all', /must be owner/],
      ['alter table patients add column smuggled text', /must be owner/],
      ['drop trigger signatures_append_only on signatures', /must be owner/],
      [`update audit_log set action = 'rewritten'`, /permission denied/],
      ['delete from audit_log', /permission denied/],
      ['truncate audit_log', /permission denied/],
      [`update signatures set meaning = 'rewritten'`, /permission denied/],
      ['delete from design_versions', /permission denied/],
      ['delete from recommendations', /permission denied/],
      ['delete from knex_migrations', /permission denied/],
      ['set session_replication_role = replica', /permission denied/],
    ];
    for (const [sql, refusal] of refusals) await expect(client.query(sql), sql).rejects.toThrow(refusal);
    expect((await client.query(`select action from audit_log where entity_type = 'test'`)).rows).toEqual([{ action: 'written' }]);
  });
});
