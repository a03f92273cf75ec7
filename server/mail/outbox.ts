/**
 * Outgoing mail is queued in PostgreSQL inside the transaction that caused it, then sent by a
 * worker with retries, so an unreachable mail server never fails the request. Any number of
 * server processes may run the worker: rows are claimed with FOR UPDATE SKIP LOCKED.
 */
import nodemailer from 'nodemailer';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Db } from '../db/knex.js';
import type { Config } from '../config.js';

export type QueuedMail = {
  kind: string;
  to: string;
  subject: string;
  text: string;
  /** Makes the enqueue idempotent: a second message with the same key is dropped. */
  dedupeKey?: string;
};

export async function enqueueMail(trx: Knex | Knex.Transaction, mail: QueuedMail | QueuedMail[]): Promise<void> {
  const rows = (Array.isArray(mail) ? mail : [mail]).map((m) => ({
    kind: m.kind,
    to_address: m.to,
    subject: m.subject,
    body_text: m.text,
    dedupe_key: m.dedupeKey ?? null,
  }));
  if (rows.length === 0) return;
  await trx('mail_outbox').insert(rows).onConflict('dedupe_key').ignore();
}

export type UnsentMail = { id: number; kind: string; to: string; subject: string; attempts: number; lastError: string | null; nextAttemptAt: Date };

/** The latest mail not sent yet (queued or being retried), newest first. */
export async function listUnsent(db: Db, limit = 100): Promise<UnsentMail[]> {
  return db('mail_outbox')
    .whereNot({ status: 'sent' })
    .orderBy('id', 'desc')
    .limit(limit)
    .select('id', 'kind', 'to_address as to', 'subject', 'attempts', 'last_error as lastError', 'next_attempt_at as nextAttemptAt');
}

const CLAIM_SECONDS = 60;
const MAX_BACKOFF_MS = 5 * 60 * 1000;

export type MailWorker = { runOnce: () => Promise<number>; kick: () => void; stop: () => Promise<void> };

export function startMailWorker(db: Db, config: Config, logger: Logger): MailWorker {
  const transport = nodemailer.createTransport({
    host: config.smtpHost,
    port: config.smtpPort,
    secure: false,
    ignoreTLS: !config.production,
    connectionTimeout: 3000,
    greetingTimeout: 3000,
    socketTimeout: 5000,
  });
  let running: Promise<number> | undefined;
  let stopped = false;

  async function claim(): Promise<Array<{ id: number; to_address: string; subject: string; body_text: string; attempts: number }>> {
    const { rows } = await db.raw(
      `update mail_outbox set status = 'sending', attempts = attempts + 1,
              next_attempt_at = now() + make_interval(secs => ?)
        where id in (select id from mail_outbox
                      where status <> 'sent' and next_attempt_at <= now()
                      order by id limit 20 for update skip locked)
        returning id, to_address, subject, body_text, attempts`,
      [CLAIM_SECONDS],
    );
    return rows;
  }

  async function runOnce(): Promise<number> {
    const batch = await claim();
    let sent = 0;
    for (const mail of batch) {
      try {
        await transport.sendMail({ from: config.mailFrom, to: mail.to_address, subject: mail.subject, text: mail.body_text });
        await db('mail_outbox').where({ id: mail.id }).update({ status: 'sent', sent_at: db.fn.now(), last_error: null });
        sent += 1;
      } catch (error) {
        const delay = Math.min(config.mailRetryBaseMs * 2 ** (mail.attempts - 1), MAX_BACKOFF_MS);
        await db('mail_outbox')
          .where({ id: mail.id })
          .update({
            status: 'queued',
            last_error: (error as Error).message.slice(0, 500),
            next_attempt_at: db.raw(`now() + make_interval(secs => ?)`, [delay / 1000]),
          });
        logger.warn({ mailId: mail.id, attempts: mail.attempts }, 'mail delivery failed; will retry');
      }
    }
    return sent;
  }

  function tick() {
    if (stopped || running) return;
    running = runOnce()
      .catch((error) => {
        logger.warn({ err: (error as Error).message }, 'mail worker could not reach the database');
        return 0;
      })
      .finally(() => {
        running = undefined;
      });
  }

  const timer = setInterval(tick, config.mailPollMs);
  timer.unref();
  return {
    runOnce,
    kick: () => setImmediate(tick),
    stop: async () => {
      stopped = true;
      clearInterval(timer);
      await running;
      transport.close();
    },
  };
}
