/**
 * The live evaluation of a trial's cohorts. Every member may call it; what each receives follows
 * the visibility rule (server/auth/visibility.ts): the statistician and committee members every
 * figure, site staff their own sites' counts, sponsors and site staff the released cut's figures
 * (and live ones where the design lets sponsors see response), the trial manager operational counts.
 */
import { actorOf, type RouteSpec } from '../http/routes.js';
import { sendJson } from '../http/send-json.js';
import { ROLES } from '../auth/access.js';
import { evaluationFor } from './evaluation.service.js';

export const evaluationRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/evaluation',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      sendJson(res, await evaluationFor(db, actorOf(req).access));
    },
  },
];
