/** Development only: what the local mail catcher received, beside the mail still queued here. */
import type { Db } from '../db/knex.js';
import type { Config } from '../config.js';
import { ServiceUnavailableError } from '../http/errors.js';
import { listUnsent, type UnsentMail } from '../mail/outbox.js';

export type OutboxView = { received: unknown[]; queued: UnsentMail[]; catcher: 'up' | 'down' | 'not configured' };

export async function outboxView(db: Db, config: Config): Promise<OutboxView> {
  const queued = await listUnsent(db);
  if (!config.mailCatcherUrl) return { received: [], queued, catcher: 'not configured' };
  try {
    const response = await fetch(`${config.mailCatcherUrl}/messages`, { signal: AbortSignal.timeout(2000) });
    const { messages } = (await response.json()) as { messages: unknown[] };
    return { received: messages, queued, catcher: 'up' };
  } catch {
    if (queued.length === 0) throw new ServiceUnavailableError('The local mail catcher is not reachable.');
    return { received: [], queued, catcher: 'down' };
  }
}
