/** Accrual of one trial: enrolment over time against the plan, by site, with projections. Every role of the trial. */
import { requireTrialAccess, type RouteSpec } from '../http/routes.js';
import { ROLES, siteScope } from '../auth/access.js';
import { toDay } from './calendar.js';
import { trialAccrual } from './accrual.service.js';

export const accrualRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/accrual',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      const access = requireTrialAccess(req);
      res.json({ accrual: await trialAccrual(db, access.trialId, { today: toDay(new Date()), sites: siteScope(access) }) });
    },
  },
];
