/**
 * The live evaluation of a trial's cohorts. Every member may read it: it is aggregate, never
 * patient-level; sponsors get response figures only where the design releases them to sponsors.
 */
import { actorOf, type RouteSpec } from '../http/routes.js';
import { ROLES } from '../auth/access.js';
import { evaluateTrial } from './evaluation.service.js';

export const evaluationRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/evaluation',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      const { access } = actorOf(req);
      res.json(await evaluateTrial(db, access.trialId, access.roles));
    },
  },
];
