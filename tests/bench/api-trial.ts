/**
 * One trial of 5,000 patients under load on loopback: the live evaluation and the patient list
 * (50 connections) and outcome writes (20 connections, each a real correction with a reason and
 * the record's version), each beside a bare Express JSON route measured in the same run. After the
 * writes, every 200 must be one version step and one audit row: no lost writes.
 * Run alone with `npx tsx tests/bench/api-trial.ts`; `npm run bench` collects the same figures.
 */
import { pathToFileURL } from 'node:url';
import { createDb, migrateLatest, type Db } from '../../server/db/knex.js';
import { startStackOn } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { bulkEnrol, daysAgo, today } from '../support/accrual-factories.js';
import type { BenchFigure } from './figures.js';
import { BENCH_SECONDS, bareExpress, describeReference, describeRun, measure, temporaryDatabase, type Measured } from './api-load.js';

const PATIENTS = 5_000;
const SITES = ['RVB', 'HCB', 'LUB', 'NGB'];
const READ_CONNECTIONS = 50;
const WRITE_CONNECTIONS = 20;

async function seedTrial(db: Db): Promise<TrialFixture> {
  const trial = await createTrial(db, { code: 'BENCH-5000', sites: SITES });
  const cohortId = trial.cohortIds[0];
  // A single-stage design sized for the cohort, so the evaluation works on a trial within its plan.
  await lockDesignDirectly(db, { trialId: trial.trialId, cohortId, r1: null, n1: null, r: 1_100, n: PATIENTS });
  const dates = Array.from({ length: PATIENTS }, (_, i) => daysAgo(720 - Math.floor((i * 700) / PATIENTS)));
  await bulkEnrol(db, { trialId: trial.trialId, cohortId, siteIds: SITES.map((s) => trial.siteIds[s]), siteCodes: SITES, dates, n1: null });
  await db.raw('analyze');
  return trial;
}

const figure = (name: string, ours: Measured, reference: Measured, connections: number, extra = ''): BenchFigure => ({
  name: `${name} — p95 latency`,
  ours: { value: ours.p95, unit: 'ms' },
  reference: { name: `bare Express JSON route, same run, ${connections} connections`, value: reference.p95, unit: 'ms' },
  ratio: reference.p95 / ours.p95,
  note: `${describeRun(ours, connections)}; ${describeReference(reference)}${extra}`,
});

/** Outcome corrections, each connection on its own patients (so no write races another) with the version it last saw. */
function outcomeWrites(trialId: string, cookie: string, origin: string, patients: Array<{ id: string; outcome: string }>) {
  const free = patients.map((p) => ({ ...p, version: 1 }));
  let accepted = 0;
  return {
    accepted: () => accepted,
    requests: [
      {
        method: 'PATCH',
        headers: { cookie, origin, 'content-type': 'application/json' },
        setupRequest: (request: Record<string, unknown>, context: Record<string, unknown>) => {
          const patient = free.shift() as (typeof free)[number];
          context.patient = patient;
          const next = patient.outcome === 'responder' ? { outcome: 'non_responder', bestOverallResponse: 'SD' } : { outcome: 'responder', bestOverallResponse: 'PR' };
          patient.outcome = next.outcome;
          return {
            ...request,
            path: `/api/trials/${trialId}/patients/${patient.id}`,
            body: JSON.stringify({ version: patient.version, ...next, responseAssessedOn: today(), evaluable: true, reason: 'Benchmark correction' }),
          };
        },
        onResponse: (status: number, _body: string, context: Record<string, unknown>) => {
          const patient = context.patient as (typeof free)[number];
          if (status === 200) {
            patient.version += 1;
            accepted += 1;
          }
          free.push(patient);
        },
      },
    ],
  };
}

async function writeTally(db: Db, trialId: string): Promise<{ steps: number; audits: number }> {
  const { rows } = await db.raw(
    `select (select coalesce(sum(version - 1), 0) from patients where trial_id = :trialId) as steps,
            (select count(*) from audit_log where trial_id = :trialId and entity_type = 'patient' and action in ('outcome_recorded', 'outcome_corrected')) as audits`,
    { trialId },
  );
  return { steps: Number(rows[0].steps), audits: Number(rows[0].audits) };
}

export async function runApiTrialBench(): Promise<BenchFigure[]> {
  const database = await temporaryDatabase();
  const db = createDb(database.url);
  const cleanups: Array<() => Promise<void>> = [() => db.destroy(), () => database.remove()];
  try {
    await migrateLatest(db);
    const trial = await seedTrial(db);
    const stack = await startStackOn(database.url, { RATE_LIMIT_PER_MINUTE: String(1_000_000_000), JOBS_ENABLED: 'false' });
    cleanups.unshift(() => stack.close());
    const bare = await bareExpress();
    cleanups.unshift(() => bare.close());
    const statistician = await stack.signIn(DEMO.statistician);
    const coordinator = await stack.signIn(DEMO.coordinator);
    const reads = { headers: { cookie: statistician.cookie } };

    const bare50 = await measure({ url: bare.url, connections: READ_CONNECTIONS });
    const evaluation = await measure({ url: `${stack.url}/api/trials/${trial.trialId}/evaluation`, connections: READ_CONNECTIONS, ...reads });
    const list = await measure({ url: `${stack.url}/api/trials/${trial.trialId}/patients?page=1&pageSize=50&sort=studyId`, connections: READ_CONNECTIONS, ...reads });

    const mine: Array<{ id: string; outcome: string }> = await db('patients').where({ trial_id: trial.trialId, site_id: trial.siteIds[SITES[0]] }).select('id', 'outcome');
    const auditBefore = (await writeTally(db, trial.trialId)).audits;
    const bare20 = await measure({ url: bare.url, connections: WRITE_CONNECTIONS });
    const writes = outcomeWrites(trial.trialId, coordinator.cookie, new URL(stack.url).origin, mine);
    const written = await measure({ url: stack.url, connections: WRITE_CONNECTIONS, requests: writes.requests });
    // One statement, one snapshot: writes still running on the server commit on both sides of it or neither.
    const after = await writeTally(db, trial.trialId);
    const versionSteps = after.steps;
    const audited = after.audits - auditBefore;
    // Writes still in flight when the run stops may commit unseen: at most one per connection.
    const lost = versionSteps !== audited || versionSteps < writes.accepted() || versionSteps > writes.accepted() + WRITE_CONNECTIONS;
    if (lost) {
      const uneven = await db.raw(
        `select p.id, p.version, count(a.id) as audits from patients p left join audit_log a on a.entity_id = p.id::text and a.action in ('outcome_recorded', 'outcome_corrected')
          where p.trial_id = ? group by p.id, p.version having count(a.id) <> p.version - 1 limit 5`,
        [trial.trialId],
      );
      throw new Error(`lost writes: ${writes.accepted()} answered 200, ${versionSteps} version steps, ${audited} audit rows; uneven: ${JSON.stringify(uneven.rows)}`);
    }

    return [
      figure(`GET /api/trials/:trialId/evaluation, ${PATIENTS.toLocaleString('en')} patients`, evaluation, bare50, READ_CONNECTIONS),
      figure(`GET /api/trials/:trialId/patients (page of 50), ${PATIENTS.toLocaleString('en')} patients`, list, bare50, READ_CONNECTIONS),
      figure(
        'PATCH /api/trials/:trialId/patients/:patientId (outcome correction)',
        written,
        bare20,
        WRITE_CONNECTIONS,
        `; no lost writes: ${writes.accepted()} answered 200, ${versionSteps} version steps = ${audited} audit rows (the difference, if any, was in flight at the stop); statuses ${JSON.stringify(written.statuses)}`,
      ),
    ];
  } finally {
    for (const cleanup of cleanups) await cleanup().catch((error: Error) => console.warn(`[bench] cleanup: ${error.message}`));
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  for (const f of await runApiTrialBench()) console.log(`${f.name}: ${f.ours.value} ${f.ours.unit} (ratio ${f.ratio.toFixed(3)}) — ${f.note}`);
  console.log(`(${BENCH_SECONDS} s per run)`);
}
