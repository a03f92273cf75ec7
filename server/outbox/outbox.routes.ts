/** Development only: what the local mail catcher received, for the Outbox page. */
import type { RouteSpec } from '../http/routes.js';
import { ServiceUnavailableError } from '../http/errors.js';

export const outboxRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/dev/outbox',
    access: { kind: 'signed-in' },
    devOnly: true,
    handler: async (_req, res, { db, config }) => {
      const queued = await db('mail_outbox')
        .whereNot({ status: 'sent' })
        .orderBy('id', 'desc')
        .limit(100)
        .select('id', 'kind', 'to_address as to', 'subject', 'attempts', 'last_error as lastError', 'next_attempt_at as nextAttemptAt');
      if (!config.mailCatcherUrl) {
        res.json({ received: [], queued, catcher: 'not configured' });
        return;
      }
      try {
        const response = await fetch(`${config.mailCatcherUrl}/messages`, { signal: AbortSignal.timeout(2000) });
        const { messages } = (await response.json()) as { messages: unknown[] };
        res.json({ received: messages, queued, catcher: 'up' });
      } catch {
        if (queued.length === 0) throw new ServiceUnavailableError('The local mail catcher is not reachable.');
        res.json({ received: [], queued, catcher: 'down' });
      }
    },
  },
];
