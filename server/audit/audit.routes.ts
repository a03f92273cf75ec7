/** The Audit trail of a trial, for the statistician and the admin (without patient-level entries); changes to the shared sites, for trial managers. */
import { actorOf, type RouteSpec } from '../http/routes.js';
import { parseQuery } from '../http/validate.js';
import { auditQuerySchema } from './audit.schema.js';
import { auditTrail, siteChanges } from './audit.service.js';

export const auditRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/audit',
    access: { kind: 'trial', roles: ['statistician', 'admin'] },
    handler: async (req, res, { db }) => {
      res.json(await auditTrail(db, actorOf(req), await parseQuery(auditQuerySchema, req.query)));
    },
  },
  {
    method: 'get',
    path: '/api/audit/sites',
    access: { kind: 'role-anywhere', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      res.json(await siteChanges(db, await parseQuery(auditQuerySchema, req.query)));
    },
  },
];
