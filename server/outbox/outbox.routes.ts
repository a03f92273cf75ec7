/** Development only: what the local mail catcher received, for the Outbox page — a user's own mail, or all of it for a trial manager. */
import { requireUser, type RouteSpec } from '../http/routes.js';
import { outboxView } from './outbox.service.js';

export const outboxRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/dev/outbox',
    access: { kind: 'signed-in' },
    devOnly: true,
    handler: async (req, res, { db, config }) => {
      res.json(await outboxView(db, config, requireUser(req)));
    },
  },
];
