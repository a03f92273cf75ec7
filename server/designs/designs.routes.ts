/**
 * Designs routes. The statistician compares and signs designs; the trial manager (admin)
 * and the committee (monitor) read them; site roles and sponsors never reach a design route.
 */
import { actorOf, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { type Role } from '../auth/access.js';
import { parseBody } from '../http/validate.js';
import { cohortTransitionSchema, designAmendmentSchema, designLockSchema, designSettingsSchema } from './designs.schema.js';
import { listTrialDesigns, moveCohort, signDesign } from './designs.service.js';
import { runDesignCandidates } from './candidates-pool.js';

const READERS: readonly Role[] = ['statistician', 'admin', 'monitor'];

export const designsRoutes: RouteSpec[] = [
  {
    method: 'post',
    path: '/api/trials/:trialId/design-candidates',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res) => {
      const settings = await parseBody(designSettingsSchema, req.body);
      res.json(await runDesignCandidates(settings));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/designs',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json({ cohorts: await listTrialDesigns(db, actorOf(req)) });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/design',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db, hooks }) => {
      const body = await parseBody(designLockSchema, req.body);
      const design = await signDesign(db, hooks, actorOf(req), { cohortId: String(req.params.cohortId), route: 'lock', body, session: signingSessionOf(req) });
      res.status(201).json({ design });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/design/amendments',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db, hooks, mail }) => {
      const body = await parseBody(designAmendmentSchema, req.body);
      const design = await signDesign(db, hooks, actorOf(req), { cohortId: String(req.params.cohortId), route: 'amendment', body, session: signingSessionOf(req) });
      // An amendment's safety rule may already be crossed by the data: the pause's mail goes out now.
      mail.kick();
      res.status(201).json({ design });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/transitions',
    access: { kind: 'trial', roles: ['statistician', 'admin'] },
    handler: async (req, res, { db }) => {
      const body = await parseBody(cohortTransitionSchema, req.body);
      res.json({ cohort: await moveCohort(db, actorOf(req), String(req.params.cohortId), body) });
    },
  },
];
