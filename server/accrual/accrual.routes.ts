/** Accrual of one trial: enrolment over time against the plan, by site, with projections. Every role of the trial. */
import { sendJson } from '../http/send-json.js';
import { actorOf, type RouteSpec } from '../http/routes.js';
import { ROLES } from '../auth/access.js';
import { toDay } from './calendar.js';
import { accrualFor } from './accrual.service.js';

export const accrualRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/accrual',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      sendJson(res, await accrualFor(db, actorOf(req), toDay(new Date())), 'accrual');
    },
  },
];
