/**
 * Production start on one machine: one server process per core (Node's `cluster`), all on one
 * port. The workers hold no state of their own — sessions, scheduled jobs' claims and queued mail
 * live in PostgreSQL — so any worker may answer any request, and one that dies is replaced.
 * `WEB_CONCURRENCY` sets the number of workers (default: the cores Node may use).
 */
import cluster from 'node:cluster';
import os from 'node:os';
import { pino } from 'pino';

// main.ts exits with 2 on a configuration problem: refork would only repeat it.
const CONFIG_EXIT_CODE = 2;

if (cluster.isPrimary) {
  const logger = pino({ level: process.env.LOG_LEVEL ?? 'info' });
  const wanted = Number(process.env.WEB_CONCURRENCY ?? os.availableParallelism());
  const workers = Number.isInteger(wanted) && wanted > 0 ? wanted : os.availableParallelism();
  let stopping = false;
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    if (code === CONFIG_EXIT_CODE) {
      logger.fatal('a worker refused the configuration; stopping');
      stopping = true;
      for (const other of Object.values(cluster.workers ?? {})) other?.kill('SIGTERM');
      process.exitCode = CONFIG_EXIT_CODE;
      return;
    }
    logger.warn({ pid: worker.process.pid, code, signal }, 'a server worker stopped; starting another');
    cluster.fork();
  });
  const stop = () => {
    stopping = true;
    const running = Object.values(cluster.workers ?? {});
    if (running.length === 0) process.exit(0);
    for (const worker of running) worker?.kill('SIGTERM');
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
  logger.info(`starting ${workers} server worker(s)`);
  for (let i = 0; i < workers; i += 1) cluster.fork();
} else {
  await import('./main.js');
}
