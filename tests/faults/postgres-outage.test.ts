/**
 * PostgreSQL stopped under load: the server keeps answering, with 503 JSON and quickly; when the
 * database returns on the same port, the same server process recovers by itself (health, the
 * sessions kept in PostgreSQL, writes), and a CSV import cut off by the outage left nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startFaultStack, type FaultStack } from '../support/fault-stack.js';
import { eventually } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { IMPORT_COLUMNS } from '../../server/patients/patients.schema.js';
import type { Session } from '../support/sign-in.js';

/** Generous: the point is "quickly, not hanging", not a benchmark (pool and connect timeouts are 2–2.5 s). */
const OUTAGE_ANSWER_MS = 5_000;
const IMPORT_HEADER = IMPORT_COLUMNS.join(',');

let faults: FaultStack;
let trial: TrialFixture;
let admin: Session;

beforeAll(async () => {
  // The load below is far above a person's pace; the limiter is not what this file tests.
  faults = await startFaultStack({ RATE_LIMIT_PER_MINUTE: '100000' });
  trial = await createTrial(faults.stack.db);
  admin = await faults.stack.signIn(DEMO.admin);
}, 120_000);
afterAll(async () => faults?.close());

type Sample = { startedAt: number; ms: number; status: number; code?: string; json: boolean };

/** Keeps `workers` signed-in readers busy until `stop()`; every answer is recorded. */
function load(session: Session, workers: number) {
  const samples: Sample[] = [];
  let running = true;
  const paths = [`/api/trials/${trial.trialId}`, '/api/me', '/api/trials'];
  const worker = async (index: number) => {
    for (let i = index; running; i += 1) {
      const startedAt = Date.now();
      const res = await session.get(paths[i % paths.length]).timeout(15_000);
      samples.push({
        startedAt,
        ms: Date.now() - startedAt,
        status: res.status,
        code: res.body?.error?.code,
        json: /application\/json/.test(res.headers['content-type'] ?? ''),
      });
    }
  };
  const done = Promise.all(Array.from({ length: workers }, (_, i) => worker(i)));
  return {
    samples,
    stop: async () => {
      running = false;
      await done;
    },
  };
}

const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('PostgreSQL stopped during load', () => {
  it('when the database stops under load, then requests answer 503 JSON within seconds; when it returns, the same process recovers with the same sessions', async () => {
    const { stack, cluster } = faults;
    const reader = await stack.signIn(DEMO.statistician);
    const traffic = load(reader, 8);
    await pause(1_000);

    cluster.kill();
    const downAt = Date.now();
    await pause(4_000);
    const health = await request(stack.url).get('/api/health').timeout(10_000);
    const healthMs = Date.now() - downAt - 4_000;
    const restartAt = Date.now();
    cluster.start();
    const upAt = Date.now();

    await eventually(async () => (await request(stack.url).get('/api/health')).status === 200, 30_000);
    await pause(500);
    await traffic.stop();

    const { samples } = traffic;
    const before = samples.filter((s) => s.startedAt + s.ms < downAt);
    const during = samples.filter((s) => s.startedAt >= downAt && s.startedAt + s.ms < restartAt);
    const after = samples.filter((s) => s.startedAt > upAt + 5_000);
    console.info(
      `[faults] ${samples.length} requests: ${before.length} before the outage, ${during.length} during (slowest ${Math.max(0, ...during.map((s) => s.ms))} ms), ${samples.filter((s) => s.startedAt > upAt).length} after`,
    );

    expect(before.length).toBeGreaterThan(0);
    expect(before.every((s) => s.status === 200)).toBe(true);
    expect(during.length).toBeGreaterThan(0);
    expect(during.filter((s) => s.status !== 503 || !s.json || s.code !== 'service_unavailable')).toEqual([]);
    expect(during.filter((s) => s.ms >= OUTAGE_ANSWER_MS)).toEqual([]);
    // Whatever was in flight as the database went away still got an answer the client can act on.
    expect(samples.filter((s) => s.status !== 200 && s.status !== 503)).toEqual([]);
    expect(after.every((s) => s.status === 200)).toBe(true);

    expect(health.status).toBe(503);
    expect(health.body).toMatchObject({ database: 'down', error: { code: 'service_unavailable' } });
    expect(healthMs).toBeLessThan(OUTAGE_ANSWER_MS);

    // Sessions live in PostgreSQL: the ones made before the outage still work, reads and writes alike.
    expect((await reader.get('/api/me')).status).toBe(200);
    const site = await admin.post('/api/sites', { code: 'OUTG', name: 'After the outage', country: 'Testland' });
    expect(site.status).toBe(201);
    expect(await stack.db('audit_log').where({ entity_type: 'site', entity_id: site.body.site.id }).first()).toBeDefined();
  }, 90_000);

  it('when the database stops in the middle of a CSV import, then after it returns none of the imported rows exist', async () => {
    const { stack, cluster } = faults;
    const importTrial = await createTrial(stack.db, { sites: ['IMP'], members: [{ email: DEMO.coordinator, role: 'coordinator', site: 'IMP' }] });
    // Single stage and large, so no enrolment rule refuses the rows before the outage does.
    await lockDesignDirectly(stack.db, { trialId: importTrial.trialId, cohortId: importTrial.cohortIds[0], r1: null, n1: null, r: 600, n: 2_000 });
    const cora = await stack.signIn(DEMO.coordinator);
    const rows = Array.from({ length: 2_000 }, (_, i) => `IMP-${i + 1},IMP,MAIN,2026-0${1 + (i % 6)}-1${i % 10},pending,,,yes,,`);
    const file = Buffer.from([IMPORT_HEADER, ...rows].join('\n') + '\n');
    const answer = cora
      .post(`/api/trials/${importTrial.trialId}/patients/import`)
      .attach('file', file, { filename: 'site.csv', contentType: 'text/csv' })
      .timeout(60_000)
      .then((res) => res.status, () => 'no answer');

    // Stop the database once the import's transaction has been open for a moment (it is then mid-way).
    await eventually(async () => {
      const { rows: open } = await stack.db.raw(
        `select 1 from pg_stat_activity where datname = current_database() and pid <> pg_backend_pid() and xact_start < now() - interval '300 milliseconds' limit 1`,
      );
      return open.length > 0;
    }, 20_000);
    cluster.kill();
    const status = await answer;
    cluster.start();
    await eventually(async () => (await request(stack.url).get('/api/health')).status === 200, 30_000);

    expect(status).toBe(503);
    expect(await stack.db('patients').where({ trial_id: importTrial.trialId }).count({ count: '*' })).toEqual([{ count: 0 }]);
    expect(await stack.db('audit_log').where({ trial_id: importTrial.trialId, entity_type: 'patient' }).count({ count: '*' })).toEqual([{ count: 0 }]);
  }, 90_000);
});
