/**
 * Development only: what the local mail catcher received, beside the mail still queued here — each
 * user sees the messages addressed to them; trial managers (admin on any trial) see every message
 * (the visibility rule, server/auth/visibility.ts).
 */
import type { Db } from '../db/knex.js';
import type { Config } from '../config.js';
import type { SessionUser } from '../auth/access.js';
import { addressedTo, seesEveryMessage } from '../auth/visibility.js';
import { ServiceUnavailableError } from '../http/errors.js';
import { listUnsent, type UnsentMail } from '../mail/outbox.js';
import { membershipsOf } from '../people/index.js';

type CaughtMessage = { to: string[] };

export type OutboxView = { received: CaughtMessage[]; queued: UnsentMail[]; catcher: 'up' | 'down' | 'not configured' };

export async function outboxView(db: Db, config: Config, user: SessionUser): Promise<OutboxView> {
  const [unsent, memberships] = await Promise.all([listUnsent(db), membershipsOf(db, user)]);
  const everything = seesEveryMessage(memberships.map((m) => m.role));
  const mine = <T>(messages: T[], recipients: (message: T) => string[]) => (everything ? messages : messages.filter((m) => addressedTo(recipients(m), user.email)));
  const queued = mine(unsent, (m) => [m.to]);
  if (!config.mailCatcherUrl) return { received: [], queued, catcher: 'not configured' };
  try {
    const response = await fetch(`${config.mailCatcherUrl}/messages`, { signal: AbortSignal.timeout(2000) });
    const { messages } = (await response.json()) as { messages: CaughtMessage[] };
    return { received: mine(messages, (m) => m.to), queued, catcher: 'up' };
  } catch {
    if (queued.length === 0) throw new ServiceUnavailableError('The local mail catcher is not reachable.');
    return { received: [], queued, catcher: 'down' };
  }
}
