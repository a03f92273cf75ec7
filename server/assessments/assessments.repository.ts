/**
 * Timepoint assessments and the derived-outcome columns of patients: the only Knex in this
 * feature. Returns camelCase domain objects.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Derivation, DerivationSettings, Outcome, TimepointResponse } from './derivation.js';

type Conn = Db | Knex.Transaction;

export type Assessment = {
  id: string;
  patientId: string;
  trialId: string;
  date: string;
  response: TimepointResponse;
  notes: string | null;
  version: number;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
};

type AssessmentRow = {
  id: string;
  patient_id: string;
  trial_id: string;
  assessed_on: string;
  response: TimepointResponse;
  notes: string | null;
  version: number;
  created_by: string | null;
  created_at: Date;
  updated_at: Date;
};

const toAssessment = (row: AssessmentRow): Assessment => ({
  id: row.id,
  patientId: row.patient_id,
  trialId: row.trial_id,
  date: row.assessed_on,
  response: row.response,
  notes: row.notes,
  version: row.version,
  createdBy: row.created_by,
  createdAt: row.created_at.toISOString(),
  updatedAt: row.updated_at.toISOString(),
});

export type OutcomeSource = 'entered' | 'derived';
export type TrialSettings = DerivationSettings & { outcomeSource: OutcomeSource };

type SettingsRow = {
  outcome_source: OutcomeSource;
  confirmation_required: boolean;
  confirmation_min_days: number;
  sd_min_days: number;
  ne_between_responses: DerivationSettings['neBetweenResponses'];
  assessment_interval_days: number;
};

const SETTINGS_COLUMNS = ['outcome_source', 'confirmation_required', 'confirmation_min_days', 'sd_min_days', 'ne_between_responses', 'assessment_interval_days'];

const toSettings = (row: SettingsRow): TrialSettings => ({
  outcomeSource: row.outcome_source,
  confirmationRequired: row.confirmation_required,
  confirmationMinDays: row.confirmation_min_days,
  sdMinDays: row.sd_min_days,
  neBetweenResponses: row.ne_between_responses,
  assessmentIntervalDays: row.assessment_interval_days,
});

/** The parts of a patient the assessments feature reads and writes. */
export type AssessedPatient = {
  id: string;
  trialId: string;
  siteId: string;
  studyId: string;
  enrolledOn: string;
  outcome: Outcome;
  bestOverallResponse: TimepointResponse | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  outcomeFlag: string | null;
  derivedBestOverallResponse: TimepointResponse | null;
  derivedResponder: boolean | null;
  derivation: Derivation | null;
  version: number;
};

type PatientRow = {
  id: string;
  trial_id: string;
  site_id: string;
  study_id: string;
  enrolled_on: string;
  outcome: Outcome;
  best_overall_response: TimepointResponse | null;
  response_assessed_on: string | null;
  evaluable: boolean;
  outcome_flag: string | null;
  derived_best_overall_response: TimepointResponse | null;
  derived_responder: boolean | null;
  derivation: Derivation | null;
  version: number;
};

const PATIENT_COLUMNS = [
  'id',
  'trial_id',
  'site_id',
  'study_id',
  'enrolled_on',
  'outcome',
  'best_overall_response',
  'response_assessed_on',
  'evaluable',
  'outcome_flag',
  'derived_best_overall_response',
  'derived_responder',
  'derivation',
  'version',
];

const toPatient = (row: PatientRow): AssessedPatient => ({
  id: row.id,
  trialId: row.trial_id,
  siteId: row.site_id,
  studyId: row.study_id,
  enrolledOn: row.enrolled_on,
  outcome: row.outcome,
  bestOverallResponse: row.best_overall_response,
  responseAssessedOn: row.response_assessed_on,
  evaluable: row.evaluable,
  outcomeFlag: row.outcome_flag,
  derivedBestOverallResponse: row.derived_best_overall_response,
  derivedResponder: row.derived_responder,
  derivation: row.derivation,
  version: row.version,
});

export async function findTrialSettings(db: Conn, trialId: string): Promise<TrialSettings | undefined> {
  const row: SettingsRow | undefined = await db('trials').where({ id: trialId }).first(SETTINGS_COLUMNS);
  return row && toSettings(row);
}

/** With `lock`, the row stays locked until the transaction ends, so writes to one patient queue up. */
export async function findPatient(db: Conn, trialId: string, patientId: string, lock = false): Promise<AssessedPatient | undefined> {
  const query = db('patients').where({ id: patientId, trial_id: trialId }).first(PATIENT_COLUMNS);
  const row: PatientRow | undefined = await (lock ? query.forUpdate() : query);
  return row && toPatient(row);
}

export async function findPatientByStudyId(trx: Knex.Transaction, trialId: string, studyId: string): Promise<AssessedPatient | undefined> {
  const row: PatientRow | undefined = await trx('patients').where({ trial_id: trialId }).whereRaw('upper(study_id) = ?', [studyId.toUpperCase()]).first(PATIENT_COLUMNS).forUpdate();
  return row && toPatient(row);
}

export async function findPatientById(trx: Knex.Transaction, patientId: string): Promise<AssessedPatient | undefined> {
  const row: PatientRow | undefined = await trx('patients').where({ id: patientId }).first(PATIENT_COLUMNS).forUpdate();
  return row && toPatient(row);
}

export async function listPatientsOfTrial(trx: Knex.Transaction, trialId: string): Promise<AssessedPatient[]> {
  const rows: PatientRow[] = await trx('patients').where({ trial_id: trialId }).orderBy('id').select(PATIENT_COLUMNS).forUpdate();
  return rows.map(toPatient);
}

export async function listAssessments(db: Conn, patientId: string): Promise<Assessment[]> {
  const rows: AssessmentRow[] = await db('assessments').where({ patient_id: patientId }).orderBy('assessed_on');
  return rows.map(toAssessment);
}

export async function listAssessmentsOfTrial(db: Conn, trialId: string): Promise<Map<string, Assessment[]>> {
  const rows: AssessmentRow[] = await db('assessments').where({ trial_id: trialId }).orderBy(['patient_id', 'assessed_on']);
  const byPatient = new Map<string, Assessment[]>();
  for (const row of rows) {
    const list = byPatient.get(row.patient_id) ?? [];
    list.push(toAssessment(row));
    byPatient.set(row.patient_id, list);
  }
  return byPatient;
}

export async function findAssessment(db: Conn, patientId: string, assessmentId: string): Promise<Assessment | undefined> {
  const row: AssessmentRow | undefined = await db('assessments').where({ id: assessmentId, patient_id: patientId }).first();
  return row && toAssessment(row);
}

export async function findAssessmentOn(db: Conn, patientId: string, date: string): Promise<Assessment | undefined> {
  const row: AssessmentRow | undefined = await db('assessments').where({ patient_id: patientId, assessed_on: date }).first();
  return row && toAssessment(row);
}

export async function insertAssessment(
  trx: Knex.Transaction,
  input: { patientId: string; trialId: string; date: string; response: TimepointResponse; notes: string | null; createdBy: string | null },
): Promise<Assessment> {
  const [row]: AssessmentRow[] = await trx('assessments')
    .insert({
      patient_id: input.patientId,
      trial_id: input.trialId,
      assessed_on: input.date,
      response: input.response,
      notes: input.notes,
      created_by: input.createdBy,
    })
    .returning('*');
  return toAssessment(row);
}

/** Undefined when the version no longer matches (someone else changed it first). */
export async function updateAssessment(
  trx: Knex.Transaction,
  id: string,
  version: number,
  changes: { date: string; response: TimepointResponse; notes: string | null },
): Promise<Assessment | undefined> {
  const [row]: AssessmentRow[] = await trx('assessments')
    .where({ id, version })
    .update({ assessed_on: changes.date, response: changes.response, notes: changes.notes, version: version + 1, updated_at: trx.fn.now() })
    .returning('*');
  return row && toAssessment(row);
}

export async function deleteAssessment(trx: Knex.Transaction, id: string, version: number): Promise<boolean> {
  return (await trx('assessments').where({ id, version }).delete()) === 1;
}

export type DerivedColumns = {
  patientId: string;
  derivedBestOverallResponse: TimepointResponse | null;
  derivedResponder: boolean | null;
  derivation: Derivation;
};

const CHUNK = 500;
const chunks = <T>(rows: T[]) => Array.from({ length: Math.ceil(rows.length / CHUNK) }, (_, i) => rows.slice(i * CHUNK, (i + 1) * CHUNK));

/** Stores derivations of many patients in a few statements (a trial-wide recompute touches thousands). */
export async function storeDerivations(trx: Knex.Transaction, rows: DerivedColumns[]): Promise<void> {
  for (const part of chunks(rows)) {
    await trx.raw(
      `update patients as p
          set derived_best_overall_response = v.bor, derived_responder = v.responder, derivation = v.derivation
         from (values ${part.map(() => '(?::uuid, ?::text, ?::boolean, ?::jsonb)').join(', ')}) as v(id, bor, responder, derivation)
        where p.id = v.id`,
      part.flatMap((r) => [r.patientId, r.derivedBestOverallResponse, r.derivedResponder, JSON.stringify(r.derivation)]),
    );
  }
}

export type OutcomeColumns = { outcome: Outcome; bestOverallResponse: TimepointResponse | null; responseAssessedOn: string | null };

/** Outcomes written by the derivation; each bumps the version like any other change to an outcome. */
export async function storeDerivedOutcomes(trx: Knex.Transaction, rows: Array<OutcomeColumns & { patientId: string }>): Promise<void> {
  for (const part of chunks(rows)) {
    await trx.raw(
      `update patients as p
          set outcome = v.outcome, best_overall_response = v.bor, response_assessed_on = v.assessed_on, version = p.version + 1, updated_at = now()
         from (values ${part.map(() => '(?::uuid, ?::text, ?::text, ?::date)').join(', ')}) as v(id, outcome, bor, assessed_on)
        where p.id = v.id`,
      part.flatMap((r) => [r.patientId, r.outcome, r.bestOverallResponse, r.responseAssessedOn]),
    );
  }
}

export async function storeOutcomeFlags(trx: Knex.Transaction, patientIds: string[], flag: string | null): Promise<void> {
  for (const part of chunks(patientIds)) await trx('patients').whereIn('id', part).update({ outcome_flag: flag });
}

export type AttentionRow = {
  patientId: string;
  studyId: string;
  siteId: string;
  siteCode: string;
  siteName: string;
  outcomeFlag: string | null;
  attention: Derivation['attention'];
  pendingConfirmation: Derivation['pendingConfirmation'];
};

/**
 * Patients that may need a look, from the stored derivation alone (no assessment is loaded, and
 * only the two parts of the derivation needed here leave the database): any attention item, a
 * response awaiting confirmation, or a flagged outcome.
 */
export async function listAttentionCandidates(db: Conn, trialId: string, siteIds: string[] | 'all'): Promise<AttentionRow[]> {
  const query = db('patients as p')
    .join('sites as s', 's.id', 'p.site_id')
    .where('p.trial_id', trialId)
    .andWhere((w) =>
      w
        .whereNotNull('p.outcome_flag')
        .orWhereRaw("jsonb_array_length(coalesce(p.derivation->'attention', '[]'::jsonb)) > 0")
        .orWhereRaw("jsonb_array_length(coalesce(p.derivation->'pendingConfirmation', '[]'::jsonb)) > 0"),
    )
    .orderBy(['s.code', 'p.study_id'])
    .select(
      'p.id',
      'p.study_id',
      'p.site_id',
      's.code as site_code',
      's.name as site_name',
      'p.outcome_flag',
      db.raw("coalesce(p.derivation->'attention', '[]'::jsonb) as attention"),
      db.raw("coalesce(p.derivation->'pendingConfirmation', '[]'::jsonb) as pending_confirmation"),
    );
  if (siteIds !== 'all') query.whereIn('p.site_id', siteIds);
  const rows: Array<{
    id: string;
    study_id: string;
    site_id: string;
    site_code: string;
    site_name: string;
    outcome_flag: string | null;
    attention: Derivation['attention'];
    pending_confirmation: Derivation['pendingConfirmation'];
  }> = await query;
  return rows.map((row) => ({
    patientId: row.id,
    studyId: row.study_id,
    siteId: row.site_id,
    siteCode: row.site_code,
    siteName: row.site_name,
    outcomeFlag: row.outcome_flag,
    attention: row.attention,
    pendingConfirmation: row.pending_confirmation,
  }));
}

export async function listTrialSites(db: Conn, trialId: string, siteIds: string[] | 'all'): Promise<Array<{ id: string; code: string; name: string }>> {
  const query = db('trial_sites as ts').join('sites as s', 's.id', 'ts.site_id').where('ts.trial_id', trialId).orderBy('s.code').select('s.id', 's.code', 's.name');
  if (siteIds !== 'all') query.whereIn('s.id', siteIds);
  return query;
}
