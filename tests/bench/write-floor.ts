/**
 * The least an audited outcome write costs on this machine, with no HTTP server in the way: N
 * PostgreSQL clients straight from the bench, each changing one patient's outcome (its version
 * moved on, the trial's data version bumped by the triggers at commit) and writing its audit row,
 * as fast as they can. Two shapes: one statement (the update and the audit row in one, the
 * cheapest a write can be) and the transaction a service writes (begin, update, audit row,
 * commit). The outcome correction's goal is judged beside it: a server cannot answer a write
 * faster than the database takes it. `auditedWriteBehindExpress` puts the same write behind the
 * least HTTP server can give it (bare-write-server.ts): what any write costs here before Orrery's
 * session, access check, validation and re-derivation, one transaction per request or by group
 * commit (the requests waiting while one transaction runs written together in the next).
 */
import pg from 'pg';
import { BENCH_SECONDS, measure } from './api-load.js';
import { startBareWriteServer } from '../support/server-process.js';

export type FloorRun = { p50: number; p95: number; perSecond: number; writes: number };

export type FloorShape = 'one statement' | 'transaction' | 'grouped';

type FloorInput = { actorUserId: string; patientIds: string[]; connections: number };

const floorAudits = async (client: pg.Client) => Number((await client.query(`select count(*) as c from audit_log where reason = 'Benchmark floor'`)).rows[0].c);

const FLIP = `outcome = case when outcome = 'responder' then 'non_responder' else 'responder' end,
  best_overall_response = case when outcome = 'responder' then 'SD' else 'PR' end,
  response_assessed_on = coalesce(response_assessed_on, enrolled_on), version = version + 1, updated_at = now()`;

export const ONE_STATEMENT = `with written as (update patients set ${FLIP} where id = $1 returning id, trial_id, outcome)
  insert into audit_log (actor_user_id, trial_id, entity_type, entity_id, action, after, reason)
  select $2, trial_id, 'patient', id, 'outcome_corrected', jsonb_build_object('outcome', outcome), 'Benchmark floor' from written`;
const UPDATE = `update patients set ${FLIP} where id = $1 returning id, trial_id, outcome`;
export const UPDATE_MANY = `update patients set ${FLIP} where id = any($1::uuid[]) returning id, trial_id, outcome`;
export const AUDIT_MANY = `insert into audit_log (actor_user_id, trial_id, entity_type, entity_id, action, after, reason)
  select $1, w.trial_id, 'patient', w.id, 'outcome_corrected', jsonb_build_object('outcome', w.outcome), 'Benchmark floor'
    from unnest($2::uuid[], $3::uuid[], $4::text[]) as w(id, trial_id, outcome)`;
const AUDIT = `insert into audit_log (actor_user_id, trial_id, entity_type, entity_id, action, after, reason)
  values ($1, $2, 'patient', $3, 'outcome_corrected', jsonb_build_object('outcome', $4::text), 'Benchmark floor')`;

/** The transaction a service writes: begin, the update, its audit row, commit (rolled back on an error). Answers the written row. */
export async function writeInTransaction(client: pg.ClientBase, patientId: string, actorUserId: string): Promise<{ id: string; trial_id: string; outcome: string }> {
  try {
    await client.query('begin');
    const { rows } = await client.query({ name: 'floor_update', text: UPDATE, values: [patientId] });
    await client.query({ name: 'floor_audit', text: AUDIT, values: [actorUserId, rows[0].trial_id, rows[0].id, rows[0].outcome] });
    await client.query('commit');
    return rows[0];
  } catch (error) {
    await client.query('rollback').catch(() => undefined);
    throw error;
  }
}

/** Runs `connections` clients for BENCH_SECONDS over the given patients (each client its own), and checks every write left its audit row. */
export async function auditedWriteFloor(
  databaseUrl: string,
  shape: Exclude<FloorShape, 'grouped'>,
  input: FloorInput,
): Promise<FloorRun> {
  const clients = await Promise.all(
    Array.from({ length: input.connections }, async () => {
      const client = new pg.Client({ connectionString: databaseUrl });
      await client.connect();
      return client;
    }),
  );
  const count = () => floorAudits(clients[0]);
  const before = await count();
  const latencies: number[] = [];
  const stopAt = performance.now() + BENCH_SECONDS * 1000;
  try {
    await Promise.all(
      clients.map(async (client, k) => {
        const mine = input.patientIds.filter((_, i) => i % input.connections === k);
        for (let i = 0; performance.now() < stopAt; i += 1) {
          const patientId = mine[i % mine.length];
          const start = performance.now();
          if (shape === 'one statement') {
            await client.query({ name: 'floor_one', text: ONE_STATEMENT, values: [patientId, input.actorUserId] });
          } else {
            await writeInTransaction(client, patientId, input.actorUserId);
          }
          latencies.push(performance.now() - start);
        }
      }),
    );
    const written = (await count()) - before;
    if (written !== latencies.length) throw new Error(`the write floor answered ${latencies.length} writes but left ${written} audit rows`);
  } finally {
    await Promise.all(clients.map((client) => client.end()));
  }
  latencies.sort((a, b) => a - b);
  const at = (q: number) => latencies[Math.min(latencies.length - 1, Math.floor(q * latencies.length))];
  return { p50: at(0.5), p95: at(0.95), perSecond: latencies.length / BENCH_SECONDS, writes: latencies.length };
}

/**
 * The same write, one per HTTP request, through Express with a JSON body parser and a pool of
 * `connections` (each request a PATCH naming its patient), measured like every route of the bench.
 * Every 200 must have left its audit row; a write in flight at the stop may commit unanswered.
 */
export async function auditedWriteBehindExpress(databaseUrl: string, shape: FloorShape, input: FloorInput): Promise<FloorRun> {
  const server = await startBareWriteServer(databaseUrl, input.actorUserId);
  const counter = new pg.Client({ connectionString: databaseUrl });
  await counter.connect();
  let next = 0;
  const load = (duration: number) =>
    measure({
      url: server.url,
      connections: input.connections,
      duration,
      requests: [
        {
          method: 'PATCH',
          headers: { 'content-type': 'application/json' },
          setupRequest: (request) => ({
            ...request,
            path: `/${{ 'one statement': 'statement', transaction: 'transaction', grouped: 'grouped' }[shape]}/${input.patientIds[next++ % input.patientIds.length]}`,
            body: JSON.stringify({ reason: 'Benchmark floor' }),
          }),
        },
      ],
    });
  try {
    // Warm first, as the reads are: this is the least the write can cost, so it is measured at its best.
    await load(3);
    await new Promise((resolve) => setTimeout(resolve, 500)); // the warm-up's last writes, in flight at its stop, commit
    const before = await floorAudits(counter);
    const run = await load(BENCH_SECONDS);
    const answered = run.statuses[200] ?? 0;
    const written = (await floorAudits(counter)) - before;
    if (answered !== run.requests || written < answered || written > answered + input.connections) {
      throw new Error(`the write floor behind Express answered ${JSON.stringify(run.statuses)} but left ${written} audit rows`);
    }
    return { p50: run.p50, p95: run.p95, perSecond: run.perSecond, writes: answered };
  } finally {
    await counter.end();
    await server.close();
  }
}
