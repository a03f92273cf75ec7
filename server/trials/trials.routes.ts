/** Trials the user can see, and one trial's basic record. */
import { ROLES, requireTrialAccess, requireUser, type RouteSpec } from '../http/routes.js';
import { NotFoundError } from '../http/errors.js';
import { findTrial, listTrialsForUser } from './trials.repository.js';

export const trialsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials',
    access: { kind: 'signed-in' },
    handler: async (req, res, { db }) => {
      res.json({ trials: await listTrialsForUser(db, requireUser(req).id) });
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      const access = requireTrialAccess(req);
      const trial = await findTrial(db, access.trialId);
      if (!trial) throw new NotFoundError('The trial');
      res.json({ trial: { ...trial, myRoles: access.roles, mySiteIds: access.siteIds } });
    },
  },
];
