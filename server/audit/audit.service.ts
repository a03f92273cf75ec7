/**
 * The Audit trail of a trial, for the statistician and the admin. The admin holds no
 * patient-level outcome data, so entries about patients, their assessments, outcomes and adverse
 * events, data cuts, analyses, committee recommendations and the figures of a safety rule's
 * crossing are left out of the admin's view entirely — not
 * merely stripped of before/after, since a reason or an entity id can say as much.
 */
import type { Db } from '../db/knex.js';
import type { Actor } from '../auth/access.js';
import { listAuditEntries } from './audit.repository.js';
import type { AuditQuery } from './audit.schema.js';

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
  'adverse_event',
  'safety_rule',
] as const;

export async function auditTrail(db: Db, actor: Actor, query: AuditQuery) {
  const seesPatientData = actor.access.roles.includes('statistician');
  const hiddenEntityTypes = seesPatientData ? [] : PATIENT_LEVEL_ENTITY_TYPES;
  const page = await listAuditEntries(db, { trialId: actor.access.trialId, hiddenEntityTypes }, query);
  return { ...page, limit: query.limit, offset: query.offset, patientLevelHidden: !seesPatientData };
}

/** Changes to the shared list of sites (which belong to no one trial), for trial managers. */
export async function siteChanges(db: Db, query: AuditQuery) {
  const page = await listAuditEntries(db, { trialId: null, entityTypes: ['site'] }, query);
  return { ...page, limit: query.limit, offset: query.offset };
}
