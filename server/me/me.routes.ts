/** The signed-in user and their own memberships (roles come from the database, never the identity provider). */
import { readPrepared } from '../db/knex.js';
import { requireUser, settleSession, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { sessionStillStored } from '../http/session.js';
import { ownMembershipsJson, trialManagerGrantExists, type OwnMembership } from '../people/index.js';
import { readyIntentsJson, toReadyIntents } from '../signatures/signatures.js';

export const meRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/me',
    access: { kind: 'signed-in' },
    confirmsSession: true,
    handler: async (req, res, { db, config }) => {
      const user = requireUser(req);
      // Every page asks this: the three small reads, each written by its own store, and the session's confirmation go to the database as one statement.
      const [row] = await readPrepared<{ stored: boolean; memberships: unknown; trialManager: unknown; signingReady: unknown }>(
        db,
        'orrery_me',
        db.select({
          stored: sessionStillStored(db, req.sessionID),
          memberships: ownMembershipsJson(db, user.id),
          trialManager: trialManagerGrantExists(db, user.id),
          signingReady: readyIntentsJson(db, signingSessionOf(req)),
        }),
      );
      settleSession(req, row.stored);
      res.json({
        user: { id: user.id, email: user.email, name: user.name },
        memberships: row.memberships as OwnMembership[],
        trialManager: row.trialManager as boolean,
        // The sign dialogs offer their final step when the password for their intent has been entered.
        signingReady: toReadyIntents(row.signingReady),
        environment: { development: !config.production, outbox: Boolean(config.mailCatcherUrl) },
      });
    },
  },
];
