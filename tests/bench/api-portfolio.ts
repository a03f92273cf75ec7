/**
 * Portfolio and Accrual under load: a portfolio of 50 trials × 500 patients, GET /api/portfolio
 * and GET /api/trials/:trialId/accrual as a signed-in sponsor and statistician (autocannon,
 * 20 connections, BENCH_SECONDS each, 8 by default, each after a 3 s warm-up), beside a bare Express JSON route measured in
 * the same run (the shared parts are in api-load.ts, the server processes in tests/support/server-process.ts).
 * Uses DATABASE_URL's server when set, else a temporary PostgreSQL cluster; cleans up after.
 * Run alone with `npx tsx tests/bench/api-portfolio.ts`; `npm run bench` collects the same figures.
 */
import { randomBytes } from 'node:crypto';
import { pathToFileURL } from 'node:url';
import pg from 'pg';
import { ensureDatabase } from '../../server/dev/postgres.js';
import { createDb, migrateLatest, type Db } from '../../server/db/knex.js';
import { DEMO, createTrial } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { bulkEnrol, daysAgo, setSitePlan, setTrialFields } from '../support/accrual-factories.js';
import { releaseCutDirectly } from '../support/data-cut-factories.js';
import { describeReference, describeRun, measureWarm, temporaryDatabase, type Measured } from './api-load.js';
import type { BenchFigure, BenchGoal } from './figures.js';
import { startBareServer, startBenchServer } from '../support/server-process.js';

const TRIALS = 50;
const PATIENTS = 500;
const SITES = ['BA', 'BB', 'BC', 'BD'];
const CONNECTIONS = 20;

/** One run in steady state (after a 3 s warm-up of the same request), then a pause so requests still in flight finish before the next run (or the shutdown). */
async function settled(url: string, headers: Record<string, string> = {}): Promise<Measured> {
  const measured = await measureWarm({ url, connections: CONNECTIONS, headers });
  await new Promise((resolve) => setTimeout(resolve, 2000));
  return measured;
}

/** 50 trials of 500 patients at four sites over two years; every fifth trial has a data cut a committee decision released. */
export async function seedPortfolio(db: Db): Promise<string[]> {
  const trialIds: string[] = [];
  for (let t = 0; t < TRIALS; t += 1) {
    const trial = await createTrial(db, {
      code: `BENCH-${String(t + 1).padStart(2, '0')}`,
      sites: SITES,
      members: [
        { email: DEMO.statistician, role: 'statistician' },
        { email: DEMO.sponsor, role: 'sponsor' },
      ],
    });
    await setTrialFields(db, trial.trialId, { startDate: daysAgo(730), plannedPerMonth: 24, indication: t % 2 ? 'Soft-tissue sarcoma' : 'Recurrent ovarian cancer' });
    for (const code of SITES) await setSitePlan(db, trial.trialId, trial.siteIds[code], 6);
    const cohortId = trial.cohortIds[0];
    await lockDesignDirectly(db, { trialId: trial.trialId, cohortId, r1: 40, n1: 200, r: 120, n: 520, cohortStatus: 'enrolling_stage_2' });
    const dates = Array.from({ length: PATIENTS }, (_, i) => daysAgo(720 - Math.floor((i * 720) / PATIENTS)));
    await bulkEnrol(db, { trialId: trial.trialId, cohortId, siteIds: SITES.map((s) => trial.siteIds[s]), siteCodes: SITES, dates, n1: 200 });
    if (t % 5 === 0) await releaseCutDirectly(db, trial, { action: 'final_analysis' });
    trialIds.push(trial.trialId);
  }
  await db.raw('analyze');
  return trialIds;
}

/** A fresh database for the run, on DATABASE_URL's server or a temporary cluster, and how to remove it. */
async function benchDatabase(): Promise<{ url: string; remove: () => Promise<void> }> {
  if (process.env.DATABASE_URL) {
    const name = `orrery_bench_${randomBytes(4).toString('hex')}`;
    const admin = new URL(process.env.DATABASE_URL);
    admin.pathname = '/postgres';
    await ensureDatabase(admin.href, name);
    const url = new URL(admin.href);
    url.pathname = `/${name}`;
    return {
      url: url.href,
      remove: async () => {
        const client = new pg.Client({ connectionString: admin.href });
        await client.connect();
        await client.query(`drop database if exists ${client.escapeIdentifier(name)} with (force)`);
        await client.end();
      },
    };
  }
  return temporaryDatabase();
}

const GOAL_MS = { portfolio: 50, accrual: 30 };

export async function runApiPortfolioBench(): Promise<{ figures: BenchFigure[]; goals: BenchGoal[] }> {
  const database = await benchDatabase();
  const db = createDb(database.url);
  const cleanups: Array<() => Promise<void>> = [() => db.destroy(), () => database.remove()];
  try {
    await migrateLatest(db);
    const trialIds = await seedPortfolio(db);
    const stack = await startBenchServer(database.url, { workers: 1 });
    cleanups.unshift(() => stack.close());
    const bare = await startBareServer();
    cleanups.unshift(() => bare.close());
    const sessions = { sponsor: await stack.signIn(DEMO.sponsor), statistician: await stack.signIn(DEMO.statistician) };

    const reference = await settled(bare.url);
    const targets = [
      { route: 'GET /api/portfolio', path: '/api/portfolio', goalMs: GOAL_MS.portfolio },
      { route: 'GET /api/trials/:trialId/accrual', path: `/api/trials/${trialIds[0]}/accrual`, goalMs: GOAL_MS.accrual },
    ];
    const figures: BenchFigure[] = [];
    const goals: BenchGoal[] = [];
    for (const target of targets) {
      for (const role of ['sponsor', 'statistician'] as const) {
        const ours = await settled(`${stack.url}${target.path}`, { cookie: sessions[role].cookie });
        figures.push({
          name: `${target.route} as ${role}, ${TRIALS} trials × ${PATIENTS} patients — p95 latency`,
          ours: { value: ours.p95, unit: 'ms' },
          reference: { name: 'bare Express JSON route, same run', value: reference.p95, unit: 'ms' },
          ratio: reference.p95 / ours.p95,
          note: `${describeRun(ours, CONNECTIONS)}; ${describeReference(reference)}`,
        });
        goals.push({
          goal: `${target.route} as ${role}, ${TRIALS} trials × ${PATIENTS} patients: p95 ≤ ${target.goalMs} ms`,
          measured: `p95 ${ours.p95.toFixed(1)} ms (${CONNECTIONS} connections)`,
          met: ours.p95 <= target.goalMs,
        });
      }
    }
    return { figures, goals };
  } finally {
    for (const cleanup of cleanups) await cleanup().catch((error: Error) => console.warn(`[bench] cleanup: ${error.message}`));
  }
}

function printTable(figures: BenchFigure[]): void {
  for (const f of figures) {
    console.log(f.name);
    console.log(`  ours      ${f.ours.value.toFixed(1)} ${f.ours.unit}`);
    console.log(`  reference ${f.reference.value.toFixed(1)} ${f.reference.unit}  (${f.reference.name})`);
    console.log(`  ratio     ${f.ratio.toFixed(3)} (reference / ours)`);
    if (f.note) console.log(`  note      ${f.note}`);
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const result = await runApiPortfolioBench();
  printTable(result.figures);
  for (const g of result.goals) console.log(`${g.met ? 'met    ' : 'not met'}  ${g.goal}: ${g.measured}`);
}
