/** Liveness and the database's state; load balancers read the status code. */
import type { RouteSpec } from '../http/routes.js';

export const healthRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/health',
    access: { kind: 'public' },
    handler: async (_req, res, { db }) => {
      try {
        await db.raw('select 1').timeout(1500, { cancel: false });
        res.json({ status: 'ok', database: 'up' });
      } catch {
        res.status(503).json({
          status: 'unavailable',
          database: 'down',
          error: { code: 'service_unavailable', message: 'The database is not reachable right now.' },
        });
      }
    },
  },
];
