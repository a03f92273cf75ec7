/**
 * The Audit trail of a trial, for the statistician and the admin. The admin holds no
 * patient-level outcome data (product brief), so entries about patients, their assessments and
 * outcomes, data cuts, analyses and committee recommendations are left out of the admin's view
 * entirely — not merely stripped of before/after, since a reason or an entity id can say as much.
 */
import { requireTrialAccess, type RouteSpec } from '../http/routes.js';
import { parseBody } from '../http/validate.js';
import { listAuditEntries } from './audit.repository.js';
import { auditQuerySchema } from './audit.schema.js';

/** Entity types whose audit rows carry patient-level outcome data. */
export const PATIENT_LEVEL_ENTITY_TYPES = [
  'patient',
  'assessment',
  'outcome',
  'attestation',
  'patient_import',
  'data_cut',
  'analysis',
  'recommendation',
] as const;

export const auditRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/audit',
    access: { kind: 'trial', roles: ['statistician', 'admin'] },
    handler: async (req, res, { db }) => {
      const access = requireTrialAccess(req);
      const query = await parseBody(auditQuerySchema, req.query);
      const seesPatientData = access.roles.includes('statistician');
      const hiddenEntityTypes = seesPatientData ? [] : PATIENT_LEVEL_ENTITY_TYPES;
      const page = await listAuditEntries(db, access.trialId, query, { hiddenEntityTypes });
      res.json({ ...page, limit: query.limit, offset: query.offset, patientLevelHidden: !seesPatientData });
    },
  },
];
