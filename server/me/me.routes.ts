/** The signed-in user and their own memberships (roles come from the database, never the identity provider). */
import { requireUser, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { isTrialManager, membershipsOf } from '../people/index.js';
import { readyIntents } from '../signatures/signatures.js';

export const meRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/me',
    access: { kind: 'signed-in' },
    handler: async (req, res, { db, config }) => {
      const user = requireUser(req);
      res.json({
        user: { id: user.id, email: user.email, name: user.name },
        memberships: await membershipsOf(db, user),
        trialManager: await isTrialManager(db, user),
        // The sign dialogs offer their final step when the password for their intent has been entered.
        signingReady: await readyIntents(db, signingSessionOf(req)),
        environment: { development: !config.production, outbox: Boolean(config.mailCatcherUrl) },
      });
    },
  },
];
