/**
 * Timepoint assessments of a patient and the trial's needs-attention list. Site roles work at
 * their own sites (other sites answer 404); the statistician and the committee read every site.
 */
import { actorOf, type RouteSpec } from '../http/routes.js';
import { type Role } from '../auth/access.js';
import { csvUpload, isDryRun, sendCsv } from '../csv/upload.js';
import { addAssessment, correctAssessment, listForPatient, needsAttention, removeAssessment } from './assessments.service.js';
import { ASSESSMENT_IMPORT_MAX_BYTES, assessmentImportTemplate, importAssessments, readAssessmentCsv } from './assessments-import.js';

const READERS: Role[] = ['coordinator', 'investigator', 'statistician', 'monitor'];
const WRITERS: Role[] = ['coordinator', 'investigator'];
const BASE = '/api/trials/:trialId/patients/:patientId/assessments';

const param = (req: { params: unknown }, name: string) => (req.params as Record<string, string>)[name];

const uploadCsv = csvUpload(ASSESSMENT_IMPORT_MAX_BYTES);

export const assessmentsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: BASE,
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await listForPatient(db, actorOf(req), param(req, 'patientId')));
    },
  },
  {
    method: 'post',
    path: BASE,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db }) => {
      res.status(201).json(await addAssessment(db, actorOf(req), param(req, 'patientId'), req.body));
    },
  },
  {
    method: 'patch',
    path: `${BASE}/:assessmentId`,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db }) => {
      res.json(await correctAssessment(db, actorOf(req), param(req, 'patientId'), param(req, 'assessmentId'), req.body));
    },
  },
  {
    method: 'delete',
    path: `${BASE}/:assessmentId`,
    access: { kind: 'trial', roles: WRITERS },
    handler: async (req, res, { db }) => {
      res.json(await removeAssessment(db, actorOf(req), param(req, 'patientId'), param(req, 'assessmentId'), req.body));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/assessments/import-template.csv',
    access: { kind: 'trial', roles: READERS },
    handler: (_req, res) => {
      sendCsv(res, 'orrery-assessments-template.csv', assessmentImportTemplate());
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/assessments/import',
    access: { kind: 'trial', roles: WRITERS },
    before: [uploadCsv],
    handler: async (req, res, { db }) => {
      const rows = readAssessmentCsv(req.file);
      res.json(await importAssessments(db, actorOf(req), rows, { dryRun: isDryRun(req) }));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/needs-attention',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await needsAttention(db, actorOf(req)));
    },
  },
];
