/** Development only: what the local mail catcher received, for the Outbox page. */
import type { RouteSpec } from '../http/routes.js';
import { outboxView } from './outbox.service.js';

export const outboxRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/dev/outbox',
    access: { kind: 'signed-in' },
    devOnly: true,
    handler: async (_req, res, { db, config }) => {
      res.json(await outboxView(db, config));
    },
  },
];
