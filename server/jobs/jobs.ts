/**
 * Scheduled jobs. Each run is claimed by inserting its (job, period) row: the primary key lets
 * exactly one server process win per period, with no in-memory timer deciding alone.
 */
import type { Logger } from 'pino';
import type { Db } from '../db/knex.js';
import type { Config } from '../config.js';
import type { MailWorker } from '../mail/outbox.js';

export type ScheduledJob = {
  name: string;
  /** The period a moment belongs to, e.g. an ISO week '2026-W49'. */
  periodOf: (now: Date) => string;
  /**
   * `trx` holds the period's claim: writes go through it so they commit with the claim. `reader`
   * is the pool, for reads that may run in parallel (one transaction's connection cannot).
   */
  run: (trx: Db, context: { period: string; now: Date; config: Config; logger: Logger; reader: Db }) => Promise<void>;
};

export type Jobs = { runDue: (now?: Date) => Promise<string[]>; stop: () => Promise<void> };

/** Claims and runs every given job whose current period has not run yet; returns the names run. */
export async function runDueJobs(db: Db, config: Config, logger: Logger, now: Date, jobs: ScheduledJob[]): Promise<string[]> {
  const ran: string[] = [];
  for (const job of jobs) {
    const period = job.periodOf(now);
    const claimed = await db.transaction(async (trx) => {
      const inserted = await trx('job_runs').insert({ job: job.name, period }).onConflict(['job', 'period']).ignore().returning('job');
      if (inserted.length === 0) return false;
      await job.run(trx, { period, now, config, logger, reader: db });
      await trx('job_runs').where({ job: job.name, period }).update({ finished_at: trx.fn.now() });
      return true;
    });
    if (claimed) ran.push(job.name);
  }
  return ran;
}

/** Offers the jobs the composition root lists every minute (and once shortly after start). */
export function startJobs(db: Db, config: Config, logger: Logger, mail: MailWorker, jobs: ScheduledJob[]): Jobs {
  let running: Promise<unknown> | undefined;
  const runDue = async (now = new Date()) => {
    const ran = await runDueJobs(db, config, logger, now, jobs);
    if (ran.length > 0) mail.kick();
    return ran;
  };
  const tick = () => {
    if (running) return;
    running = runDue()
      .catch((error) => logger.warn({ err: (error as Error).message }, 'scheduled jobs could not run'))
      .finally(() => {
        running = undefined;
      });
  };
  const timer = config.jobsEnabled ? setInterval(tick, 60_000) : undefined;
  timer?.unref();
  if (config.jobsEnabled) setTimeout(tick, 5_000).unref();
  return {
    runDue,
    stop: async () => {
      if (timer) clearInterval(timer);
      await running;
    },
  };
}
