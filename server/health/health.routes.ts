/** Liveness and the database's state; load balancers read the status code. */
import type { RouteSpec } from '../http/routes.js';
import { databaseIsUp } from '../db/knex.js';

export const healthRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/health',
    access: { kind: 'public' },
    handler: async (_req, res, { db }) => {
      if (await databaseIsUp(db)) {
        res.json({ status: 'ok', database: 'up' });
        return;
      }
      res.status(503).json({
        status: 'unavailable',
        database: 'down',
        error: { code: 'service_unavailable', message: 'The database is not reachable right now.' },
      });
    },
  },
];
