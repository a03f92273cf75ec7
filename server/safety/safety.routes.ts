/**
 * Safety routes. Adverse events are recorded by the site roles at their own sites (other sites'
 * patients answer 404 on every route) and read by them there, and by the statistician and the
 * committee everywhere; the investigator of the patient's site attests them. The live safety state
 * shows figures: every member may call it, and what each receives follows the visibility rule
 * (server/auth/visibility.ts), as for efficacy. The stateless safety calculations are the statistician's.
 */
import { actorOf, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { parseBody, parseQuery } from '../http/validate.js';
import { ROLES, type Role } from '../auth/access.js';
import { csvUpload, isDryRun, sendCsv } from '../csv/upload.js';
import { boundaryWithCurve, runBryantDayGrid, runSafetyDesigns } from '../designs/index.js';
import { toxicityBoundary } from '../stats/index.js';
import { bryantDayCharacteristicsSchema, EVENT_IMPORT_MAX_BYTES, eventListQuerySchema, safetyDesignSettingsSchema, toxicityBoundarySchema } from './safety.schema.js';
import { addEvent, attestEvent, correctEvent, patientEvents, removeEvent, trialEvents } from './adverse-events.service.js';
import { eventImportTemplate, importEvents, readEventCsv } from './adverse-events-import.js';
import { safetyFor } from './safety.service.js';
import { safetyAttention } from './attention.js';

const READERS: Role[] = ['coordinator', 'investigator', 'statistician', 'monitor'];
const WRITERS: Role[] = ['coordinator', 'investigator'];
const BASE = '/api/trials/:trialId/patients/:patientId/adverse-events';

const param = (req: { params: unknown }, name: string) => (req.params as Record<string, string>)[name];

const uploadCsv = csvUpload(EVENT_IMPORT_MAX_BYTES);

export const safetyRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: BASE,
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await patientEvents(db, actorOf(req), param(req, 'patientId')));
    },
  },
  {
    method: 'post',
    path: BASE,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db, mail }) => {
      const written = await addEvent(db, actorOf(req), param(req, 'patientId'), req.body);
      if (written.safety.paused) mail.kick();
      res.status(201).json(written);
    },
  },
  {
    method: 'patch',
    path: `${BASE}/:eventId`,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db, mail }) => {
      const written = await correctEvent(db, actorOf(req), param(req, 'patientId'), param(req, 'eventId'), req.body);
      if (written.safety.paused) mail.kick();
      res.json(written);
    },
  },
  {
    method: 'delete',
    path: `${BASE}/:eventId`,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db }) => {
      res.json(await removeEvent(db, actorOf(req), param(req, 'patientId'), param(req, 'eventId'), req.body));
    },
  },
  {
    method: 'post',
    path: `${BASE}/:eventId/attestation`,
    access: { kind: 'trial', roles: ['investigator'] },
    handler: async (req, res, { db }) => {
      res.status(201).json(await attestEvent(db, actorOf(req), param(req, 'patientId'), param(req, 'eventId'), req.body, signingSessionOf(req)));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/adverse-events',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await trialEvents(db, actorOf(req), await parseQuery(eventListQuerySchema, req.query)));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/adverse-events/import-template.csv',
    access: { kind: 'trial', roles: READERS },
    handler: (_req, res) => {
      sendCsv(res, 'orrery-adverse-events-template.csv', eventImportTemplate());
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/adverse-events/import',
    access: { kind: 'trial', roles: WRITERS },
    before: [uploadCsv],
    handler: async (req, res, { db, mail }) => {
      const rows = readEventCsv(req.file);
      const report = await importEvents(db, actorOf(req), rows, { dryRun: isDryRun(req) });
      if (report.committed && report.pausedCohorts.length > 0) mail.kick();
      res.json(report);
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/safety/needs-attention',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await safetyAttention(db, actorOf(req)));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/safety',
    access: { kind: 'trial', roles: ROLES },
    handler: async (req, res, { db }) => {
      res.json(await safetyFor(db, actorOf(req).access));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/safety-designs',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res) => {
      const settings = await parseBody(safetyDesignSettingsSchema, req.body);
      const { optimal, minimax } = await runSafetyDesigns(settings);
      res.json({ optimal, minimax });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/toxicity-boundary',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res) => {
      const { bounds, nominalLevel, crossingProbability } = toxicityBoundary(await parseBody(toxicityBoundarySchema, req.body));
      res.json({ bounds, nominalLevel, crossingProbability });
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/toxicity-boundary/characteristics',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res) => {
      res.json(boundaryWithCurve(await parseBody(toxicityBoundarySchema, req.body)));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/safety-designs/characteristics',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res) => {
      res.json(await runBryantDayGrid(await parseBody(bryantDayCharacteristicsSchema, req.body)));
    },
  },
];
