/**
 * The load-testing parts the API benchmarks share: a fresh database on a temporary cluster and an
 * autocannon run that keeps every response time so percentiles are exact (the server processes and
 * the bare reference route are in tests/support/server-process.ts).
 */
import { randomBytes } from 'node:crypto';
import autocannon from 'autocannon';
import { ensureDatabase, removeDataDir, startCluster, temporaryDataDir } from '../../server/dev/postgres.js';
import { freePort } from '../../server/dev/ports.js';

export const BENCH_SECONDS = Number(process.env.BENCH_SECONDS ?? 8);

export type Measured = { p50: number; p95: number; p97_5: number; p99: number; perSecond: number; requests: number; failures: number; statuses: Record<number, number> };

function percentile(sorted: number[], q: number): number {
  return sorted.length === 0 ? NaN : sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)];
}

type RawRequest = { method?: string; path?: string; headers?: Record<string, string>; body?: string };
type Context = Record<string, unknown>;

/** autocannon options beyond the small typed part: per-request setup and response hooks for writes. */
export type RunOptions = Parameters<typeof autocannon>[0] & {
  connections: number;
  method?: string;
  body?: string;
  requests?: Array<RawRequest & { setupRequest?: (request: RawRequest, context: Context) => RawRequest; onResponse?: (status: number, body: string, context: Context) => void }>;
};

/** One bounded autocannon run; `requests` lets a run vary each request (writes to different records). */
export async function measure(options: RunOptions): Promise<Measured> {
  const times: number[] = [];
  const statuses: Record<number, number> = {};
  const instance = autocannon({ duration: BENCH_SECONDS, ...options });
  // on() returns the instance itself, whose completion is awaited below.
  void instance.on('response', (_client: unknown, status: number, _bytes: number, responseTime: number) => {
    times.push(responseTime);
    statuses[status] = (statuses[status] ?? 0) + 1;
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  return {
    p50: percentile(times, 0.5),
    p95: percentile(times, 0.95),
    p97_5: percentile(times, 0.975),
    p99: percentile(times, 0.99),
    perSecond: result.requests.total / result.duration,
    requests: result.requests.total,
    failures: result.non2xx + result.errors + result.timeouts,
    statuses,
  };
}

/**
 * A read measured in steady state: a 3 s run of the same request first, so the server's compiled
 * code and its kept answers are warm, as they are for every later request of a running server.
 */
export async function measureWarm(options: RunOptions): Promise<Measured> {
  await measure({ ...options, duration: 3 });
  return measure(options);
}

/** A temporary PostgreSQL cluster (fast, throw-away settings) with one empty database. */
export async function temporaryDatabase(): Promise<{ url: string; remove: () => Promise<void> }> {
  const dataDir = temporaryDataDir();
  const cluster = startCluster({ dataDir, port: await freePort(), fast: true });
  const name = `orrery_bench_${randomBytes(4).toString('hex')}`;
  await ensureDatabase(cluster.url('postgres'), name);
  return {
    url: cluster.url(name),
    remove: () => {
      cluster.stop();
      removeDataDir(dataDir);
      return Promise.resolve();
    },
  };
}

const ms = (value: number) => `${value.toFixed(1)} ms`;

export const describeRun = (m: Measured, connections: number) =>
  `${connections} connections × ${BENCH_SECONDS} s: p50 ${ms(m.p50)}, p95 ${ms(m.p95)}, p99 ${ms(m.p99)}, ${m.perSecond.toFixed(0)} req/s (${m.requests} requests, ${m.failures} not 2xx)`;

export const describeReference = (m: Measured) => `bare route ${m.perSecond.toFixed(0)} req/s, p50 ${ms(m.p50)}, p99 ${ms(m.p99)}`;
