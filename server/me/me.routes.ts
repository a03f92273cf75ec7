/** The signed-in user and their own memberships (roles come from the database, never the identity provider). */
import { preparedStatement, readPrepared } from '../db/knex.js';
import { requireUser, settleSession, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { sessionStillStored } from '../http/session.js';
import { ownMembershipsJson, trialManagerGrantExists, type OwnMembership } from '../people/index.js';
import { readyIntentsJson, toReadyIntents } from '../signatures/signatures.js';

// Every page asks this: the three small reads, each written by its own store, and the session's confirmation go to the database as one statement.
const meRow = preparedStatement('orrery_me', (db, sessionId: string, nowSeconds: number, userId: string) =>
  db.select({
    stored: sessionStillStored(db, sessionId, nowSeconds),
    memberships: ownMembershipsJson(db, userId),
    trialManager: trialManagerGrantExists(db, userId),
    signingReady: readyIntentsJson(db, { userId, sessionId }),
  }),
);

export const meRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/me',
    access: { kind: 'signed-in' },
    confirmsSession: true,
    handler: async (req, res, { db, config }) => {
      const user = requireUser(req);
      const { sessionId } = signingSessionOf(req);
      const [row] = await readPrepared<{ stored: boolean; memberships: unknown; trialManager: unknown; signingReady: unknown }>(db, meRow(db, sessionId, Date.now() / 1000, user.id));
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
