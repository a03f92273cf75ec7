/**
 * Patients and outcomes. Coordinators and investigators work at their own sites only (other sites'
 * patients answer 404 on every route); statisticians and committee members read every site; trial
 * managers (admin) and sponsors never receive patient-level rows. Writing is for the site roles:
 * a statistician reads and analyses but does not enter site data.
 */
import { actorOf, signingSessionOf, type RouteSpec } from '../http/routes.js';
import { parseBody, parseQuery } from '../http/validate.js';
import type { Role } from '../auth/access.js';
import { csvUpload, isDryRun, sendCsv } from '../csv/upload.js';
import { sendJson } from '../http/send-json.js';
import { enrolSchema, IMPORT_MAX_BYTES, listQuerySchema } from './patients.schema.js';
import { attest, changeOutcome, enrol, history, listForUser, requireVisiblePatient } from './patients.service.js';
import { importPatients, importTemplate, patientsExport, readCsv } from './patients-import.js';

const READ: Role[] = ['coordinator', 'investigator', 'statistician', 'monitor'];
const WRITE: Role[] = ['coordinator', 'investigator'];

const uploadCsv = csvUpload(IMPORT_MAX_BYTES);

export const patientsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/patients',
    access: { kind: 'trial', roles: READ },
    handler: async (req, res, { db }) => {
      sendJson(res, await listForUser(db, actorOf(req), await parseQuery(listQuerySchema, req.query)));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/patients',
    access: { kind: 'trial', roles: WRITE },
    handler: async (req, res, { db, hooks, mail }) => {
      const { patient, accrual } = await enrol(db, hooks, actorOf(req), await parseBody(enrolSchema, req.body));
      mail.kick();
      res.status(201).json({ patient, accrual });
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/patients/import-template.csv',
    access: { kind: 'trial', roles: READ },
    handler: (_req, res) => {
      sendCsv(res, 'orrery-patients-template.csv', importTemplate());
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/patients/export.csv',
    access: { kind: 'trial', roles: READ },
    handler: async (req, res, { db }) => {
      sendCsv(res, 'orrery-patients.csv', await patientsExport(db, actorOf(req)));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/patients/import',
    access: { kind: 'trial', roles: WRITE },
    before: [uploadCsv],
    handler: async (req, res, { db, hooks, mail }) => {
      const rows = readCsv(req.file);
      const report = await importPatients(db, hooks, actorOf(req), rows, { dryRun: isDryRun(req) });
      if (report.committed) mail.kick();
      res.json(report);
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/patients/:patientId',
    access: { kind: 'trial', roles: READ },
    handler: async (req, res, { db }) => {
      res.json({ patient: await requireVisiblePatient(db, actorOf(req), String(req.params.patientId)) });
    },
  },
  {
    method: 'patch',
    path: '/api/trials/:trialId/patients/:patientId',
    access: { kind: 'trial', roles: WRITE },
    handler: async (req, res, { db, hooks, mail }) => {
      const change = await changeOutcome(db, hooks, actorOf(req), String(req.params.patientId), req.body);
      if (change.accrual.paused || change.accrual.continuesAtRisk) mail.kick();
      res.json(change);
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/patients/:patientId/attestation',
    access: { kind: 'trial', roles: ['investigator'] },
    handler: async (req, res, { db, hooks }) => {
      res.status(201).json(await attest(db, hooks, actorOf(req), String(req.params.patientId), req.body, signingSessionOf(req)));
    },
  },
  {
    method: 'get',
    path: '/api/trials/:trialId/patients/:patientId/history',
    access: { kind: 'trial', roles: READ },
    handler: async (req, res, { db }) => {
      res.json(await history(db, actorOf(req), String(req.params.patientId)));
    },
  },
];
