/** Trials: the ones a user can see, one trial's record, and setting a trial up (admin; protocol settings: statistician). */
import { actorOf, firstReadOf, requireUser, type RouteSpec } from '../http/routes.js';
import { ROLES, isUuid } from '../auth/access.js';
import { NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { cohortSchema, cohortUpdateSchema, protocolSettingsSchema, trialCreateSchema, trialUpdateSchema } from './trials.schema.js';
import { addCohort, createTrial, trialDetail, trialsFor, updateCohort, updateProtocolSettings, updateTrial } from './trials.service.js';

export const trialsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials',
    access: { kind: 'signed-in' },
    confirmsSession: true,
    handler: async (req, res, { db }) => {
      res.json({ trials: await trialsFor(db, requireUser(req), firstReadOf(req, db)) });
    },
  },
  {
    method: 'post',
    path: '/api/trials',
    access: { kind: 'role-anywhere', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(trialCreateSchema, req.body);
      const trial = await createTrial(db, requireUser(req), input);
      res.status(201).json({ trial });
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      res.json({ trial: await trialDetail(db, actorOf(req)) });
    },
  },
  {
    method: 'patch',
    path: '/api/trials/:trialId',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(trialUpdateSchema, req.body);
      res.json({ trial: await updateTrial(db, actorOf(req), input) });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/cohorts',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(cohortSchema, req.body);
      res.status(201).json({ cohort: await addCohort(db, actorOf(req), input) });
    },
  },
  {
    method: 'patch',
    path: '/api/trials/:trialId/cohorts/:cohortId',
    access: { kind: 'trial', roles: ['admin'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(cohortUpdateSchema, req.body);
      const cohortId = req.params.cohortId;
      if (!isUuid(cohortId)) throw new NotFoundError('The cohort');
      res.json({ cohort: await updateCohort(db, actorOf(req), cohortId, input) });
    },
  },
  {
    method: 'patch',
    path: '/api/trials/:trialId/protocol-settings',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db, hooks }) => {
      const input = await parseBody(protocolSettingsSchema, req.body);
      res.json({ trial: await updateProtocolSettings(db, hooks, actorOf(req), input) });
    },
  },
];
