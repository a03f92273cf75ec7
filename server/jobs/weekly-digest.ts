/**
 * The weekly sponsor digest as a scheduled job: once per ISO week, every sponsor's digest
 * (server/portfolio/digest.service.ts) is queued in the job's transaction with a de-duplication key
 * per (period, sponsor), then sent by the mail worker.
 */
import { enqueueMail } from '../mail/outbox.js';
import { isoWeekOf, toDay } from '../accrual/index.js';
import { weeklyDigests } from '../portfolio/index.js';
import type { ScheduledJob } from './jobs.js';

export const DIGEST_JOB = 'weekly-digest';

export const weeklyDigestJob: ScheduledJob = {
  name: DIGEST_JOB,
  periodOf: (now) => isoWeekOf(toDay(now)),
  run: async (trx, { period, now, reader }) => {
    const digests = await weeklyDigests(reader, now);
    await enqueueMail(
      trx,
      digests.map(({ userId, digest }) => ({ kind: DIGEST_JOB, to: digest.to, subject: digest.subject, text: digest.text, dedupeKey: `${DIGEST_JOB}:${period}:${userId}` })),
    );
  },
};
