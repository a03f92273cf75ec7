/**
 * The production start on one machine (server/cluster.ts): the workers share one port, any of them
 * serves a signed-in user, and a worker that dies is replaced while the others keep answering.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase } from '../support/stack.js';
import { startBenchServer, type BenchServer } from '../support/server-process.js';
import { eventually } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import { createDb } from '../../server/db/knex.js';

let server: BenchServer;

beforeAll(async () => {
  const database = await createTestDatabase();
  const owner = createDb(database.ownerUrl);
  await createTrial(owner);
  await owner.destroy();
  server = await startBenchServer(database.runtimeUrl, { workers: 2 });
}, 120_000);
afterAll(async () => server?.close());

describe('the clustered production start', () => {
  it('when started with two workers, then both run and a signed-in user is served', async () => {
    await eventually(() => server.workerPids().length === 2);
    const session = await server.signIn(DEMO.statistician);
    const me = await session.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.memberships.length).toBeGreaterThan(0);
  });

  it('when a worker dies, then another takes its place and requests keep being answered', async () => {
    const [victim, survivor] = server.workerPids();
    process.kill(victim, 'SIGKILL');
    const replaced = await eventually(() => {
      const now = server.workerPids();
      return now.length === 2 && !now.includes(victim) && now.includes(survivor) && now;
    }, 30_000);
    expect(replaced).toHaveLength(2);
    await eventually(async () => (await fetch(`${server.url}/api/health`)).ok, 30_000);
    const session = await server.signIn(DEMO.coordinator);
    expect((await session.get('/api/me')).status).toBe(200);
  });
});
