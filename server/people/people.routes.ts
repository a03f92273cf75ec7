/** People & sites: memberships of a trial (admin and statistician read them; site roles do not). */
import type { RouteSpec } from '../http/routes.js';
import { requireTrialAccess } from '../http/routes.js';

export const peopleRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/memberships',
    access: { kind: 'trial', roles: ['admin', 'statistician'] },
    handler: async (req, res, { db }) => {
      const { trialId } = requireTrialAccess(req);
      const memberships = await db('memberships as m')
        .leftJoin('sites as s', 's.id', 'm.site_id')
        .leftJoin('users as u', 'u.id', 'm.user_id')
        .where('m.trial_id', trialId)
        .orderBy([{ column: 'm.role' }, { column: 'm.email' }])
        .select(
          'm.id',
          'm.email',
          'm.role',
          'm.status',
          'm.site_id as siteId',
          's.code as siteCode',
          'u.name',
          'm.version',
        );
      res.json({ memberships });
    },
  },
];
