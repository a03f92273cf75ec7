/** The signed-in user and their own memberships (roles come from the database, never the identity provider). */
import type { RouteSpec } from '../http/routes.js';
import { requireUser } from '../http/routes.js';

export const meRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/me',
    access: { kind: 'signed-in' },
    handler: async (req, res, { db, config }) => {
      const user = requireUser(req);
      const memberships = await db('memberships as m')
        .join('trials as t', 't.id', 'm.trial_id')
        .leftJoin('sites as s', 's.id', 'm.site_id')
        .where({ 'm.user_id': user.id, 'm.status': 'active' })
        .orderBy([{ column: 't.code' }, { column: 'm.role' }])
        .select('m.id', 'm.trial_id as trialId', 't.code as trialCode', 'm.role', 'm.site_id as siteId', 's.code as siteCode');
      const authTime = req.session.authTime;
      res.json({
        user: { id: user.id, email: user.email, name: user.name },
        memberships,
        authenticatedAt: authTime ? new Date(authTime * 1000).toISOString() : null,
        environment: { development: !config.production, outbox: Boolean(config.mailCatcherUrl) },
      });
    },
  },
];
