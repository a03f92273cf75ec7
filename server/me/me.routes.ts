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
      // Three small reads at once: the page waits for the slowest, not for their sum.
      const [memberships, trialManager, signingReady] = await Promise.all([membershipsOf(db, user), isTrialManager(db, user), readyIntents(db, signingSessionOf(req))]);
      res.json({
        user: { id: user.id, email: user.email, name: user.name },
        memberships,
        trialManager,
        // The sign dialogs offer their final step when the password for their intent has been entered.
        signingReady,
        environment: { development: !config.production, outbox: Boolean(config.mailCatcherUrl) },
      });
    },
  },
];
