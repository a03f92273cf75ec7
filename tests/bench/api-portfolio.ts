/**
 * Portfolio and Accrual under load: a portfolio of 50 trials × 500 patients, GET /api/portfolio
 * and GET /api/trials/:trialId/accrual as a signed-in sponsor and statistician (autocannon,
 * 20 connections, 10 s each), beside a bare Express JSON route measured in the same run. The
 * load generator and both servers share this process, so the ratio is the fair comparison.
 * Uses DATABASE_URL's server when set, else a temporary PostgreSQL cluster; cleans up after.
 * Run alone with `npx tsx tests/bench/api-portfolio.ts`; `npm run bench` collects the same figures.
 */
import { randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { pathToFileURL } from 'node:url';
import express from 'express';
import autocannon from 'autocannon';
import pg from 'pg';
import { ensureDatabase, removeDataDir, startCluster, temporaryDataDir } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';
import { createDb, migrateLatest, type Db } from '../../server/db/knex.js';
import { startStackOn } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { bulkEnrol, cutDataDirectly, daysAgo, setSitePlan, setTrialFields } from '../support/accrual-factories.js';
import type { BenchFigure } from './figures.js';

const TRIALS = 50;
const PATIENTS = 500;
const SITES = ['BA', 'BB', 'BC', 'BD'];
const CONNECTIONS = 20;
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);

type Measured = { p50: number; p95: number; p99: number; perSecond: number; requests: number; failures: number };

const ms = (value: number) => `${value.toFixed(1)} ms`;

function percentile(sorted: number[], q: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)];
}

/** Drives one URL for SECONDS with CONNECTIONS connections, keeping every response time for exact percentiles. */
async function measure(url: string, headers: Record<string, string> = {}): Promise<Measured> {
  const times: number[] = [];
  const instance = autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  instance.on('response', (_client: unknown, _status: number, _bytes: number, responseTime: number) => times.push(responseTime));
  const result = await instance;
  // Requests still in flight when the run stops finish before the next run (or the shutdown) begins.
  await new Promise((resolve) => setTimeout(resolve, 2000));
  times.sort((a, b) => a - b);
  return {
    p50: percentile(times, 0.5),
    p95: percentile(times, 0.95),
    p99: percentile(times, 0.99),
    perSecond: result.requests.total / result.duration,
    requests: result.requests.total,
    failures: result.non2xx + result.errors + result.timeouts,
  };
}

/** 50 trials of 500 patients at four sites over two years; every fifth trial has a data cut released to the sponsor. */
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
    if (t % 5 === 0) await cutDataDirectly(db, { trialId: trial.trialId, cohortId, releasedToSponsorAt: new Date() });
    trialIds.push(trial.trialId);
  }
  await db.raw('analyze');
  return trialIds;
}

async function bareServer(): Promise<{ url: string; close: () => Promise<void> }> {
  const app = express();
  app.get('/bare', (_req, res) => {
    res.json({ ok: true });
  });
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}/bare`,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

/** A fresh database for the run, on DATABASE_URL's server or a temporary cluster, and how to remove it. */
async function benchDatabase(): Promise<{ url: string; remove: () => Promise<void> }> {
  const name = `orrery_bench_${randomBytes(4).toString('hex')}`;
  if (process.env.DATABASE_URL) {
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
  const dataDir = temporaryDataDir();
  const cluster = startCluster({ dataDir, port: await freePort(), fast: true });
  await ensureDatabase(cluster.url('postgres'), name);
  return {
    url: cluster.url(name),
    remove: async () => {
      cluster.stop();
      removeDataDir(dataDir);
    },
  };
}

export async function runApiPortfolioBench(): Promise<BenchFigure[]> {
  const database = await benchDatabase();
  const db = createDb(database.url);
  const cleanups: Array<() => Promise<void>> = [() => db.destroy(), () => database.remove()];
  try {
    await migrateLatest(db);
    const trialIds = await seedPortfolio(db);
    const stack = await startStackOn(database.url, { RATE_LIMIT_PER_MINUTE: String(1_000_000_000), JOBS_ENABLED: 'false' });
    cleanups.unshift(() => stack.close());
    const bare = await bareServer();
    cleanups.unshift(() => bare.close());
    const sessions = { sponsor: await stack.signIn(DEMO.sponsor), statistician: await stack.signIn(DEMO.statistician) };

    const reference = await measure(bare.url);
    const targets = [
      { route: 'GET /api/portfolio', path: '/api/portfolio' },
      { route: 'GET /api/trials/:trialId/accrual', path: `/api/trials/${trialIds[0]}/accrual` },
    ];
    const figures: BenchFigure[] = [];
    for (const target of targets) {
      for (const role of ['sponsor', 'statistician'] as const) {
        const ours = await measure(`${stack.url}${target.path}`, { cookie: sessions[role].cookie });
        figures.push({
          name: `${target.route} as ${role}, ${TRIALS} trials × ${PATIENTS} patients — p95 latency`,
          ours: { value: ours.p95, unit: 'ms' },
          reference: { name: 'bare Express JSON route, same run', value: reference.p95, unit: 'ms' },
          ratio: reference.p95 / ours.p95,
          note:
            `${CONNECTIONS} connections × ${SECONDS} s: p50 ${ms(ours.p50)}, p99 ${ms(ours.p99)}, ${ours.perSecond.toFixed(0)} req/s` +
            ` (${ours.requests} requests, ${ours.failures} failed); bare route p50 ${ms(reference.p50)}, p99 ${ms(reference.p99)}, ${reference.perSecond.toFixed(0)} req/s`,
        });
      }
    }
    return figures;
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
  printTable(await runApiPortfolioBench());
}
