/**
 * The assessments store: a patient's timepoint assessments, the only module that reads or writes
 * the assessments table. Returns camelCase domain objects; the outcome derived from them is stored
 * on the patient through the patients store.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { TimepointResponse } from './derivation.js';

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

export async function listAssessments(db: Conn, patientId: string): Promise<Assessment[]> {
  const rows: AssessmentRow[] = await db('assessments').where({ patient_id: patientId }).orderBy('assessed_on');
  return rows.map(toAssessment);
}

export async function listAssessmentsOfTrial(db: Conn, trialId: string): Promise<Map<string, Assessment[]>> {
  return byPatient(await db('assessments').where({ trial_id: trialId }).orderBy(['patient_id', 'assessed_on']));
}

/** The assessments of these patients, each patient's in date order. */
export async function listAssessmentsOfPatients(db: Conn, patientIds: readonly string[]): Promise<Map<string, Assessment[]>> {
  if (patientIds.length === 0) return new Map();
  return byPatient(await db('assessments').whereRaw('patient_id = any(?::uuid[])', [[...patientIds]]).orderBy(['patient_id', 'assessed_on']));
}

function byPatient(rows: AssessmentRow[]): Map<string, Assessment[]> {
  const grouped = new Map<string, Assessment[]>();
  for (const row of rows) {
    const list = grouped.get(row.patient_id) ?? [];
    list.push(toAssessment(row));
    grouped.set(row.patient_id, list);
  }
  return grouped;
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
