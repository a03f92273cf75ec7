/**
 * Orrery as its own process tree, started as in production (`server/cluster.ts`, one or more
 * workers, logging at info to a discarded stdout): the benchmarks load it without sharing its event
 * loop (the bare reference route runs in a child process of its own the same way), and the
 * clustered-start test kills its workers. The identity provider and the mail catcher stay in this
 * process.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { startIdp } from '../../fake-idp/provider.js';
import { startMailCatcher } from '../../server/dev/mail-catcher.js';
import { freePort } from '../../server/dev/ports.js';
import { ROOT } from './e2e-browser.js';
import { signIn, type Session } from './sign-in.js';

// BENCH_SERVER_NODE_ARGS profiles the servers, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof" (cluster workers inherit it).
const NODE_ARGS = ['--import', 'tsx', ...(process.env.BENCH_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean)];

function residentOf(pid: number): number {
  try {
    return Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? 0) * 1024;
  } catch {
    return 0;
  }
}

/** The cluster's workers: the primary's children that run Node (tsx's esbuild helper is another child). */
function workerPids(primary: number): number[] {
  try {
    const children = readFileSync(`/proc/${primary}/task/${primary}/children`, 'utf8').trim().split(/\s+/).filter(Boolean).map(Number);
    return children.filter((pid) => readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0')[0] === process.execPath);
  } catch {
    return [];
  }
}

/** Resident sets in bytes: each worker (the processes that serve requests) and the primary that only forks them. */
export function residentBytes(primary: number): { workers: number[]; primary: number } {
  return { workers: workerPids(primary).map(residentOf), primary: residentOf(primary) };
}

async function waitForHealth(url: string, child: ChildProcess, output: () => string): Promise<void> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server process stopped (${child.exitCode}): ${output()}`);
    try {
      if ((await fetch(`${url}/api/health`)).ok) return;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`the server process did not answer in time: ${output()}`);
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

function stopped(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const force = setTimeout(() => child.kill('SIGKILL'), 10_000);
    child.once('exit', () => {
      clearTimeout(force);
      resolve();
    });
    child.kill('SIGTERM');
  });
}

function spawnNode(script: string, env: Record<string, string>): { child: ChildProcess; output: () => string } {
  const child = spawn(process.execPath, [...NODE_ARGS, path.join(ROOT, script)], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'pipe'] });
  let errors = '';
  child.stderr?.on('data', (chunk: Buffer) => {
    errors = (errors + chunk.toString()).slice(-4000);
  });
  return { child, output: () => errors };
}

export type BenchServer = {
  url: string;
  workers: number;
  /** The cluster's primary. */
  pid: number;
  workerPids: () => number[];
  signIn: (email: string) => Promise<Session>;
  residentBytes: () => { workers: number[]; primary: number };
  close: () => Promise<void>;
};

/**
 * Orrery on `databaseUrl` as `workers` cluster workers, rate limits lifted and the scheduled jobs
 * off (they would add load of their own), with its identity provider and mail catcher.
 */
export async function startBenchServer(databaseUrl: string, options: { workers: number }): Promise<BenchServer> {
  const [port, idpPort] = [await freePort(), await freePort()];
  const origin = `http://localhost:${port}`;
  const catcher = await startMailCatcher({ smtpPort: 0, httpPort: 0 });
  const idp = await startIdp({ port: idpPort, appOrigins: [origin] });
  const { child, output } = spawnNode('server/cluster.ts', {
    WEB_CONCURRENCY: String(options.workers),
    DATABASE_URL: databaseUrl,
    SESSION_SECRET: 'bench-session-secret-bench-session-secret',
    APP_ORIGIN: origin,
    PORT: String(port),
    OIDC_ISSUER: idp.issuer,
    SMTP_PORT: String(catcher.smtpPort),
    MAIL_CATCHER_URL: catcher.httpUrl,
    JOBS_ENABLED: 'false',
    RATE_LIMIT_PER_MINUTE: String(1_000_000_000),
    LOG_LEVEL: 'info',
    SERVE_CLIENT_FROM: '',
  });
  try {
    await waitForHealth(origin, child, output);
  } catch (error) {
    await stopped(child);
    await idp.close();
    await catcher.close();
    throw error;
  }
  return {
    url: origin,
    workers: options.workers,
    pid: child.pid as number,
    workerPids: () => workerPids(child.pid as number),
    signIn: (email) => signIn(origin, email),
    residentBytes: () => residentBytes(child.pid as number),
    close: async () => {
      await stopped(child);
      await idp.close();
      await catcher.close();
    },
  };
}

/**
 * The write floor behind HTTP (bare-write-server.ts), in a process of its own: Express and a pg
 * pool doing nothing but the audited outcome write, as `actorUserId`, on `databaseUrl`.
 */
export async function startBareWriteServer(databaseUrl: string, actorUserId: string): Promise<{ url: string; close: () => Promise<void> }> {
  const port = await freePort();
  const { child, output } = spawnNode('tests/bench/bare-write-server.ts', { PORT: String(port), DATABASE_URL: databaseUrl, ACTOR_USER_ID: actorUserId });
  const url = `http://127.0.0.1:${port}`;
  await waitForHealth(url, child, output);
  return { url, close: () => stopped(child) };
}

/** The reference: the cheapest JSON answer Express gives (bare-server.ts), in a process of its own. */
export async function startBareServer(): Promise<{ url: string; close: () => Promise<void> }> {
  const port = await freePort();
  const { child, output } = spawnNode('tests/bench/bare-server.ts', { PORT: String(port) });
  const url = `http://127.0.0.1:${port}`;
  await waitForHealth(url, child, output);
  return { url: `${url}/bare`, close: () => stopped(child) };
}
