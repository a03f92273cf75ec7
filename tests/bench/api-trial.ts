/**
 * One trial of 5,000 patients (20,000 assessments) under load on loopback: the live evaluation and
 * the patient list (50 connections) and outcome writes (20 connections, each a real correction with
 * a reason and the record's version), each beside a bare Express JSON route measured in the same
 * run. After the writes, every 200 must be one version step and one audit row: no lost writes.
 * Then Needs attention on that trial, and a 2,000-patient CSV import into another trial, its dry
 * run and its commit end to end (checked: 2,000 patients and 2,000 audit rows, nothing else).
 * Last, the floor under the writes (write-floor.ts): audited outcome writes straight to PostgreSQL,
 * then the same writes behind a bare Express route.
 * The server runs as its own process (tests/support/server-process.ts); its resident set is read at the end.
 * Run alone with `npx tsx tests/bench/api-trial.ts`; `npm run bench` collects the same figures.
 */
import { pathToFileURL } from 'node:url';
import { createDb, migrateLatest, type Db } from '../../server/db/knex.js';
import { recomputeDerivationsForTrial } from '../../server/assessments/assessments.service.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { addDays } from '../../server/accrual/calendar.js';
import { bulkEnrol, daysAgo, setTrialFields, today } from '../support/accrual-factories.js';
import { setOutcomeSettings } from '../support/assessment-factories.js';
import type { Session } from '../support/sign-in.js';
import type { BenchFigure, BenchGoal } from './figures.js';
import { BENCH_SECONDS, describeReference, describeRun, measure, measureWarm, temporaryDatabase, type Measured } from './api-load.js';
import { startBareServer, startBenchServer } from '../support/server-process.js';
import { auditedWriteBehindExpress, auditedWriteFloor, type FloorRun } from './write-floor.js';

const PATIENTS = 5_000;
const SITES = ['RVB', 'HCB', 'LUB', 'NGB'];
const ASSESSMENTS_PER_PATIENT = 4;
const READ_CONNECTIONS = 50;
const WRITE_CONNECTIONS = 20;
const IMPORT_ROWS = 2_000;
const ATTENTION_SAMPLES = 20;
const MIB = 2 ** 20;

async function seedTrial(db: Db): Promise<TrialFixture> {
  const trial = await createTrial(db, { code: 'BENCH-5000', sites: SITES });
  const cohortId = trial.cohortIds[0];
  // A single-stage design sized for the cohort, so the evaluation works on a trial within its plan.
  await lockDesignDirectly(db, { trialId: trial.trialId, cohortId, r1: null, n1: null, r: 1_100, n: PATIENTS });
  const dates = Array.from({ length: PATIENTS }, (_, i) => daysAgo(720 - Math.floor((i * 700) / PATIENTS)));
  await bulkEnrol(db, { trialId: trial.trialId, cohortId, siteIds: SITES.map((s) => trial.siteIds[s]), siteCodes: SITES, dates, n1: null });
  await seedAssessments(db, trial.trialId);
  await db.raw('analyze');
  return trial;
}

/** Four assessments per patient (every eighth patient's last response still unconfirmed), then every stored derivation, as Needs attention reads them. */
async function seedAssessments(db: Db, trialId: string): Promise<void> {
  await setOutcomeSettings(db, trialId, { confirmationRequired: true, confirmationMinDays: 28, assessmentIntervalDays: 56 });
  const patients: Array<{ id: string; enrolled_on: string }> = await db('patients').where({ trial_id: trialId }).orderBy('enrolment_seq').select('id', 'enrolled_on');
  const responses = ['SD', 'PR', 'PR', 'SD'];
  const rows = patients.flatMap((p, i) =>
    Array.from({ length: ASSESSMENTS_PER_PATIENT }, (_, k) => ({
      trial_id: trialId,
      patient_id: p.id,
      assessed_on: addDays(p.enrolled_on, 42 * (k + 1)) > today() ? addDays(p.enrolled_on, k + 1) : addDays(p.enrolled_on, 42 * (k + 1)),
      response: i % 8 === 0 && k === ASSESSMENTS_PER_PATIENT - 1 ? 'PR' : responses[k],
    })),
  );
  for (let i = 0; i < rows.length; i += 2000) await db('assessments').insert(rows.slice(i, i + 2000));
  await db.transaction((trx) => recomputeDerivationsForTrial(trx, trialId));
}

/**
 * A second trial for the import: a two-stage design counting the evaluable population (so a change
 * of evaluability restages the cohort), its stage 1 larger than the file.
 */
async function seedImportTrial(db: Db): Promise<TrialFixture> {
  const trial = await createTrial(db, { code: 'BENCH-IMPORT', sites: SITES });
  await setTrialFields(db, trial.trialId, { startDate: daysAgo(730) });
  await lockDesignDirectly(db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], r1: 100, n1: IMPORT_ROWS + 500, r: 600, n: 2 * IMPORT_ROWS, analysisPopulation: 'evaluable' });
  return trial;
}

/**
 * 2,000 patients at the coordinator's site, a mix of outcomes, as a site's spreadsheet would hold
 * them: new, or (`corrected`) the same patients back with every outcome changed and a reason, one
 * in six made not evaluable.
 */
function importCsv(corrected = false): Buffer {
  const header = 'study_id,site_code,cohort_code,enrolled_on,outcome,best_overall_response,response_assessed_on,evaluable,not_evaluable_reason,correction_reason';
  const lines = Array.from({ length: IMPORT_ROWS }, (_, i) => {
    const enrolled = daysAgo(700 - Math.floor((i * 600) / IMPORT_ROWS));
    const assessed = addDays(enrolled, 56);
    const id = `${SITES[0]}-${String(i + 1).padStart(4, '0')},${SITES[0]},MAIN,${enrolled}`;
    if (i % 6 === 5) return corrected ? `${id},responder,PR,${assessed},yes,,` : `${id},pending,,,yes,,`;
    if (i % 6 === 2 && corrected) return `${id},non_responder,NE,${assessed},no,Withdrew before the first scan,Scans re-read centrally`;
    const responder = (i % 4 === 0) !== corrected;
    return `${id},${responder ? 'responder' : 'non_responder'},${responder ? 'PR' : 'SD'},${assessed},yes,,${corrected ? 'Scans re-read centrally' : ''}`;
  });
  return Buffer.from([header, ...lines].join('\n') + '\n');
}

async function timed<T>(work: () => Promise<T>): Promise<{ ms: number; value: T }> {
  const start = performance.now();
  const value = await work();
  return { ms: performance.now() - start, value };
}

type ImportTimes = { dryRunMs: number[]; commitMs: number };

/**
 * One file's dry run (median of three), then its commit once, both checked for what they wrote:
 * first 2,000 new patients, then the same 2,000 back with every outcome changed (corrections and
 * first records, each one audit row and one version step).
 */
async function importRuns(db: Db, trial: TrialFixture, coordinator: Session): Promise<{ fresh: ImportTimes; corrected: ImportTimes }> {
  const tally = async () => {
    const { rows } = await db.raw(
      `select (select count(*) from patients where trial_id = :trialId) as patients,
              (select coalesce(sum(version), 0) from patients where trial_id = :trialId) as versions,
              (select count(*) from audit_log where trial_id = :trialId and entity_type = 'patient' and action in ('enrolled', 'outcome_recorded', 'outcome_corrected')) as audits`,
      { trialId: trial.trialId },
    );
    return { patients: Number(rows[0].patients), versions: Number(rows[0].versions), audits: Number(rows[0].audits) };
  };
  const run = async (file: Buffer, kind: 'new' | 'update'): Promise<ImportTimes> => {
    const upload = (dryRun: boolean) =>
      coordinator.post(`/api/trials/${trial.trialId}/patients/import${dryRun ? '?dryRun=1' : ''}`).attach('file', file, { filename: 'site.csv', contentType: 'text/csv' });
    const before = await tally();
    const dryRunMs: number[] = [];
    for (let i = 0; i < 3; i += 1) {
      const { ms, value } = await timed(async () => upload(true));
      if (value.status !== 200 || value.body.counts[kind] !== IMPORT_ROWS) throw new Error(`dry run answered ${value.status}: ${JSON.stringify(value.body).slice(0, 400)}`);
      dryRunMs.push(ms);
    }
    const untouched = await tally();
    if (JSON.stringify(untouched) !== JSON.stringify(before)) throw new Error(`the dry run wrote ${JSON.stringify({ before, untouched })}`);
    const commit = await timed(async () => upload(false));
    if (commit.value.status !== 200 || !commit.value.body.committed) throw new Error(`import answered ${commit.value.status}: ${JSON.stringify(commit.value.body).slice(0, 400)}`);
    const written = await tally();
    const expected = kind === 'new' ? { patients: IMPORT_ROWS, versions: IMPORT_ROWS, audits: IMPORT_ROWS } : { patients: IMPORT_ROWS, versions: 2 * IMPORT_ROWS, audits: 2 * IMPORT_ROWS };
    if (JSON.stringify(written) !== JSON.stringify(expected)) throw new Error(`the import wrote ${JSON.stringify(written)}, expected ${JSON.stringify(expected)}`);
    return { dryRunMs: dryRunMs.sort((a, b) => a - b), commitMs: commit.ms };
  };
  return { fresh: await run(importCsv(), 'new'), corrected: await run(importCsv(true), 'update') };
}

/** Needs attention one request at a time (what one person opening the page waits for). */
async function attentionRuns(url: string, cookie: string): Promise<number[]> {
  const times: number[] = [];
  for (let i = 0; i < ATTENTION_SAMPLES + 2; i += 1) {
    const { ms, value } = await timed(async () => fetch(url, { headers: { cookie } }));
    if (value.status !== 200) throw new Error(`needs attention answered ${value.status}`);
    const body = (await value.json()) as { sites: Array<{ items: unknown[] }> };
    if (body.sites.every((s) => s.items.length === 0)) throw new Error('needs attention found nothing to show');
    if (i >= 2) times.push(ms);
  }
  return times.sort((a, b) => a - b);
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

export type TrialBenchResult = { figures: BenchFigure[]; goals: BenchGoal[]; residentMiB: number; primaryMiB: number };

const ms = (v: number) => `${v.toFixed(1)} ms`;
const median = (sorted: number[]) => sorted[Math.floor(sorted.length / 2)];

export async function runApiTrialBench(): Promise<TrialBenchResult> {
  const database = await temporaryDatabase();
  const db = createDb(database.url);
  const cleanups: Array<() => Promise<void>> = [() => db.destroy(), () => database.remove()];
  try {
    await migrateLatest(db);
    const trial = await seedTrial(db);
    const importTrial = await seedImportTrial(db);
    const stack = await startBenchServer(database.url, { workers: 1 });
    cleanups.unshift(() => stack.close());
    const bare = await startBareServer();
    cleanups.unshift(() => bare.close());
    const statistician = await stack.signIn(DEMO.statistician);
    const coordinator = await stack.signIn(DEMO.coordinator);
    const reads = { headers: { cookie: statistician.cookie } };

    const bare50 = await measure({ url: bare.url, connections: READ_CONNECTIONS });
    // Reads in steady state (a 3 s warm-up each); the writes below are measured from their first request.
    const evaluation = await measureWarm({ url: `${stack.url}/api/trials/${trial.trialId}/evaluation`, connections: READ_CONNECTIONS, ...reads });
    const list = await measureWarm({ url: `${stack.url}/api/trials/${trial.trialId}/patients?page=1&pageSize=50&sort=studyId`, connections: READ_CONNECTIONS, ...reads });

    const mine: Array<{ id: string; outcome: string }> = await db('patients').where({ trial_id: trial.trialId, site_id: trial.siteIds[SITES[0]] }).select('id', 'outcome');
    const auditBefore = (await writeTally(db, trial.trialId)).audits;
    const bare20 = await measure({ url: bare.url, connections: WRITE_CONNECTIONS });
    // Orrery's own signed-in no-op at the writes' concurrency: the request pipeline every write goes through, before any work.
    const me20 = await measureWarm({ url: `${stack.url}/api/me`, connections: WRITE_CONNECTIONS, headers: { cookie: coordinator.cookie } });
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

    const attention = await attentionRuns(`${stack.url}/api/trials/${trial.trialId}/needs-attention`, statistician.cookie);
    const imported = await importRuns(db, importTrial, coordinator);
    const resident = stack.residentBytes();
    const residentMiB = Math.max(...resident.workers) / MIB;
    const primaryMiB = resident.primary / MIB;
    // The least an audited write costs here, straight to PostgreSQL (the imported trial's patients, untouched by the runs above).
    const floorInput = {
      actorUserId: (await db('users').where({ email: DEMO.coordinator }).first('id')).id as string,
      patientIds: (await db('patients').where({ trial_id: importTrial.trialId }).whereNot('outcome', 'pending').pluck('id')) as string[],
      connections: WRITE_CONNECTIONS,
    };
    const floorOne = await auditedWriteFloor(database.url, 'one statement', floorInput);
    const floorTransaction = await auditedWriteFloor(database.url, 'transaction', floorInput);
    const httpOne = await auditedWriteBehindExpress(database.url, 'one statement', floorInput);
    const httpTransaction = await auditedWriteBehindExpress(database.url, 'transaction', floorInput);
    const httpGrouped = await auditedWriteBehindExpress(database.url, 'grouped', floorInput);

    const within = (ours: Measured, reference: Measured, factor: number) => ours.p95 <= factor * reference.p95;
    const ratioText = (ours: Pick<Measured, 'p95'>, reference: Measured) => `p95 ${ms(ours.p95)} vs bare ${ms(reference.p95)} (${(ours.p95 / reference.p95).toFixed(1)}×)`;
    const goals: BenchGoal[] = [
      { goal: 'Evaluation at 5,000 patients: p95 within 3× the bare route (50 connections)', measured: ratioText(evaluation, bare50), met: within(evaluation, bare50, 3) },
      { goal: 'Patient page at 5,000 patients: p95 within 3× the bare route (50 connections)', measured: ratioText(list, bare50), met: within(list, bare50, 3) },
      {
        goal: 'Outcome correction: p95 within 3× the bare route (20 connections), no lost write',
        measured:
          `${ratioText(written, bare20)}; no write lost. The floor, an audited write straight to PostgreSQL: ${ratioText(floorTransaction, bare20)} as a transaction, ${ratioText(floorOne, bare20)} as one statement;` +
          ` the same write behind a bare Express route (no session, access check, validation or re-derivation): ${ratioText(httpTransaction, bare20)} as a transaction, ${ratioText(httpOne, bare20)} as one statement, ${ratioText(httpGrouped, bare20)} by group commit;` +
          ` Orrery's signed-in no-op GET /api/me, which writes nothing: ${ratioText(me20, bare20)}`,
        met: within(written, bare20, 3),
      },
      { goal: 'Needs attention at 5,000 patients / 20,000 assessments ≤ 100 ms', measured: `median ${ms(median(attention))}, slowest ${ms(attention[attention.length - 1])} of ${attention.length}`, met: median(attention) <= 100 },
      {
        goal: 'CSV import of 2,000 patients ≤ 5 s end to end',
        measured: `new patients ${ms(imported.fresh.commitMs)}; the same patients' outcomes changed ${ms(imported.corrected.commitMs)}`,
        met: Math.max(imported.fresh.commitMs, imported.corrected.commitMs) <= 5000,
      },
      {
        goal: 'CSV import dry run of 2,000 patients ≤ 2 s',
        measured: `median of 3: new patients ${ms(median(imported.fresh.dryRunMs))}; outcomes changed ${ms(median(imported.corrected.dryRunMs))}`,
        met: Math.max(median(imported.fresh.dryRunMs), median(imported.corrected.dryRunMs)) <= 2000,
      },
    ];
    /** An audited write's run (write-floor.ts) beside the bare route at the writes' concurrency. */
    const floorFigure = (how: string, run: FloorRun, who: string, what: string): BenchFigure => ({
      name: `Audited outcome write ${how} — p95 latency`,
      ours: { value: run.p95, unit: 'ms' },
      reference: { name: `bare Express JSON route, same run, ${WRITE_CONNECTIONS} connections`, value: bare20.p95, unit: 'ms' },
      ratio: bare20.p95 / run.p95,
      note: `${WRITE_CONNECTIONS} ${who} × ${BENCH_SECONDS} s: p50 ${ms(run.p50)}, p95 ${ms(run.p95)}, ${run.perSecond.toFixed(0)} writes/s, ${what}`,
    });
    const figures = [
      figure(`GET /api/trials/:trialId/evaluation, ${PATIENTS.toLocaleString('en')} patients`, evaluation, bare50, READ_CONNECTIONS),
      figure(`GET /api/trials/:trialId/patients (page of 50), ${PATIENTS.toLocaleString('en')} patients`, list, bare50, READ_CONNECTIONS),
      figure(
        'PATCH /api/trials/:trialId/patients/:patientId (outcome correction)',
        written,
        bare20,
        WRITE_CONNECTIONS,
        `; no lost writes: ${writes.accepted()} answered 200, ${versionSteps} version steps = ${audited} audit rows (the difference, if any, was in flight at the stop); statuses ${JSON.stringify(written.statuses)}`,
      ),
      ...(
        [
          ['straight to PostgreSQL, no HTTP (one statement)', floorOne, 'clients', 'each with its audit row (checked); the floor under the outcome correction'],
          ['straight to PostgreSQL, no HTTP (transaction)', floorTransaction, 'clients', 'each with its audit row (checked); the floor under the outcome correction'],
        ] as const
      ).map(([how, run, who, what]) => floorFigure(how, run, who, what)),
      figure(`GET /api/me (signed in, a no-op), at the writes' concurrency`, me20, bare20, WRITE_CONNECTIONS, '; the request pipeline every write goes through'),
      ...(
        [
          ['behind a bare Express route (one statement)', httpOne],
          ['behind a bare Express route (transaction)', httpTransaction],
          ['behind a bare Express route (group commit)', httpGrouped],
        ] as const
      ).map(([how, run]) => floorFigure(how, run, 'connections', `each 200 with its audit row (checked); JSON body parsed, a pg pool of ${WRITE_CONNECTIONS}, nothing else`)),
      {
        name: `GET /api/trials/:trialId/needs-attention, ${PATIENTS.toLocaleString('en')} patients / ${(PATIENTS * ASSESSMENTS_PER_PATIENT).toLocaleString('en')} assessments — median of ${ATTENTION_SAMPLES}`,
        ours: { value: median(attention), unit: 'ms' },
        reference: { name: 'the goal', value: 100, unit: 'ms' },
        ratio: 100 / median(attention),
        note: `one request at a time: fastest ${ms(attention[0])}, slowest ${ms(attention[attention.length - 1])}`,
      },
      ...([
        [`${IMPORT_ROWS.toLocaleString('en')} new patients`, imported.fresh, 'the commit wrote 2,000 patients with their audit rows, the dry runs nothing'],
        [
          `the same ${IMPORT_ROWS.toLocaleString('en')} patients, every outcome changed, one in six made not evaluable`,
          imported.corrected,
          'the commit wrote 2,000 outcome changes (one version step and one audit row each; the two-stage cohort restaged), the dry runs nothing',
        ],
      ] as const).map(([what, times, wrote]): BenchFigure => ({
        name: `POST /api/trials/:trialId/patients/import, ${what} — end to end`,
        ours: { value: times.commitMs, unit: 'ms' },
        reference: { name: 'the goal', value: 5000, unit: 'ms' },
        ratio: 5000 / times.commitMs,
        note: `dry runs ${times.dryRunMs.map(ms).join(', ')} (goal 2,000 ms); ${wrote}`,
      })),
    ];
    return { figures, goals, residentMiB, primaryMiB };
  } finally {
    for (const cleanup of cleanups) await cleanup().catch((error: Error) => console.warn(`[bench] cleanup: ${error.message}`));
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const result = await runApiTrialBench();
  for (const f of result.figures) console.log(`${f.name}: ${f.ours.value.toFixed(1)} ${f.ours.unit} (ratio ${f.ratio.toFixed(3)}) — ${f.note}`);
  for (const g of result.goals) console.log(`${g.met ? 'met    ' : 'not met'}  ${g.goal}: ${g.measured}`);
  console.log(`server worker's resident set: ${result.residentMiB.toFixed(0)} MiB (the primary: ${result.primaryMiB.toFixed(0)} MiB)`);
  console.log(`(${BENCH_SECONDS} s per run)`);
}
