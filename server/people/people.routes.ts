/**
 * People & sites: global site records (any trial manager edits them), and a trial's memberships
 * (admin and statistician read them; the admin invites, changes and removes). Site roles do not
 * see who else works on the trial.
 */
import type { Request } from 'express';
import { actorOf, requireUser, type RouteSpec } from '../http/routes.js';
import { isUuid } from '../auth/access.js';
import { NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { membershipInviteSchema, membershipUpdateSchema, siteSchema, siteUpdateSchema } from './people.schema.js';
import { createSite, inviteMember, listSites, memberships, removeMember, updateMember, updateSite } from './people.service.js';

function recordId(req: Request, name: string, what: string): string {
  const id = req.params[name];
  if (!isUuid(id)) throw new NotFoundError(what);
  return id;
}

export const peopleRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/sites',
    access: { kind: 'signed-in' },
    handler: async (_req, res, { db }) => {
      res.json({ sites: await listSites(db) });
    },
  },
  {
    method: 'post',
    path: '/api/sites',
    access: { kind: 'role-anywhere', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(siteSchema, req.body);
      res.status(201).json({ site: await createSite(db, requireUser(req), input) });
    },
  },
  {
    method: 'patch',
    path: '/api/sites/:siteId',
    access: { kind: 'role-anywhere', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const siteId = recordId(req, 'siteId', 'The site');
      const input = await parseBody(siteUpdateSchema, req.body);
      res.json({ site: await updateSite(db, requireUser(req), siteId, input) });
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/memberships',
    access: { kind: 'trial', roles: ['admin', 'statistician'] },
    handler: async (req, res, { db }) => {
      res.json({ memberships: await memberships(db, actorOf(req)) });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/memberships',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db, config, mail }) => {
      const input = await parseBody(membershipInviteSchema, req.body);
      const membership = await inviteMember(db, actorOf(req), input, config.appOrigin);
      mail.kick();
      res.status(201).json({ membership });
    },
  },
  {
    method: 'patch',
    path: '/api/trials/:trialId/memberships/:membershipId',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const membershipId = recordId(req, 'membershipId', 'The membership');
      const input = await parseBody(membershipUpdateSchema, req.body);
      res.json({ membership: await updateMember(db, actorOf(req), membershipId, input) });
    },
  },
  {
    method: 'delete',
    path: '/api/trials/:trialId/memberships/:membershipId',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const membershipId = recordId(req, 'membershipId', 'The membership');
      await removeMember(db, actorOf(req), membershipId);
      res.status(204).end();
    },
  },
];
