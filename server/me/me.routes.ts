/** The signed-in user and their own memberships (roles come from the database, never the identity provider). */
import { requireUser, type RouteSpec } from '../http/routes.js';
import { membershipsOf } from '../people/index.js';

export const meRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/me',
    access: { kind: 'signed-in' },
    handler: async (req, res, { db, config }) => {
      const user = requireUser(req);
      const authTime = req.session.authTime;
      res.json({
        user: { id: user.id, email: user.email, name: user.name },
        memberships: await membershipsOf(db, user),
        authenticatedAt: authTime ? new Date(authTime * 1000).toISOString() : null,
        environment: { development: !config.production, outbox: Boolean(config.mailCatcherUrl) },
      });
    },
  },
];
