/**
 * Design studio routes. The statistician compares and signs designs; the trial manager (admin)
 * and the committee (monitor) read them; site roles and sponsors never reach a design route.
 */
import { requireTrialAccess, requireUser, type RouteSpec } from '../http/routes.js';
import { type Role } from '../auth/access.js';
import { parseBody } from '../http/validate.js';
import { requireFreshAuthentication } from '../signatures/signatures.js';
import { cohortTransitionSchema, designAmendmentSchema, designLockSchema, designSettingsSchema } from './design-studio.schema.js';
import { listTrialDesigns, moveCohort, signDesign } from './design-studio.service.js';
import { runDesignCandidates } from './candidates-pool.js';

const READERS: readonly Role[] = ['statistician', 'admin', 'monitor'];

export const designStudioRoutes: RouteSpec[] = [
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
      res.json({ cohorts: await listTrialDesigns(db, requireTrialAccess(req).trialId) });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/design',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db, config }) => {
      const body = await parseBody(designLockSchema, req.body);
      const user = requireUser(req);
      const design = await signDesign(db, {
        trialId: requireTrialAccess(req).trialId,
        cohortId: String(req.params.cohortId),
        signer: { id: user.id, email: user.email },
        route: 'lock',
        body,
        authenticate: () => requireFreshAuthentication(req, config),
      });
      res.status(201).json({ design });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/design/amendments',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db, config }) => {
      const body = await parseBody(designAmendmentSchema, req.body);
      const user = requireUser(req);
      const design = await signDesign(db, {
        trialId: requireTrialAccess(req).trialId,
        cohortId: String(req.params.cohortId),
        signer: { id: user.id, email: user.email },
        route: 'amendment',
        body,
        authenticate: () => requireFreshAuthentication(req, config),
      });
      res.status(201).json({ design });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts/:cohortId/transitions',
    access: { kind: 'trial', roles: ['statistician', 'admin'] },
    handler: async (req, res, { db }) => {
      const body = await parseBody(cohortTransitionSchema, req.body);
      const cohort = await moveCohort(db, {
        trialId: requireTrialAccess(req).trialId,
        cohortId: String(req.params.cohortId),
        access: requireTrialAccess(req),
        actorUserId: requireUser(req).id,
        body,
      });
      res.json({ cohort });
    },
  },
];
