/**
 * CSV import of timepoint assessments, one row per assessment (study_id, date, response, notes,
 * correction_reason). The upload is checked (type, size, UTF-8, exact columns, row count); every
 * row is applied through the same checks as the form, inside the shared import skeleton
 * (server/csv/import.ts: one transaction, a savepoint per row, all-or-nothing, a dry run rolled
 * back). A row for a date the patient already has is unchanged when it matches, a correction when
 * it differs and gives a reason, an error otherwise. Each touched patient is re-derived once at the
 * end. Notes that start like a spreadsheet formula are stored with a leading quote; fixed-format
 * cells that do are refused.
 */
import type { Knex } from 'knex';
import { ValidationError } from 'yup';
import type { Db } from '../db/knex.js';
import { AppError } from '../http/errors.js';
import { RowError, runImport, type ImportCounts } from '../csv/import.js';
import { writableSites, type Actor } from '../auth/access.js';
import { neutralise, startsLikeFormula, toCsv } from '../csv/neutralise.js';
import { readUploadedCsv, type UploadedFile } from '../csv/upload.js';
import { assessmentSchema } from './assessments.schema.js';
import { findPatientById, findPatientByStudyId } from '../patients/index.js';
import { findAssessmentOn } from './assessments.repository.js';
import { applyCorrection, createAssessment, recomputeDerivation } from './assessments.service.js';

export const ASSESSMENT_IMPORT_COLUMNS = ['study_id', 'date', 'response', 'notes', 'correction_reason'] as const;
export const ASSESSMENT_IMPORT_MAX_BYTES = 1024 * 1024;
export const ASSESSMENT_IMPORT_MAX_ROWS = 5000;

type Column = (typeof ASSESSMENT_IMPORT_COLUMNS)[number];
type CsvRow = Record<Column, string>;
const REQUIRED: Column[] = ['study_id', 'date', 'response'];
const TEXT_COLUMNS: Column[] = ['notes', 'correction_reason'];

export type AssessmentRowResult = {
  line: number;
  studyId: string;
  date: string;
  result: 'new' | 'update' | 'unchanged' | 'error';
  errors: Array<{ column: Column | 'row'; reason: string }>;
  patientId?: string;
};
export type AssessmentImportReport = {
  dryRun: boolean;
  committed: boolean;
  counts: ImportCounts;
  rows: AssessmentRowResult[];
  /** Patients whose derived best overall response changed with this file. */
  derivationsChanged: number;
};

export function assessmentImportTemplate(): string {
  return toCsv([...ASSESSMENT_IMPORT_COLUMNS], []);
}

/** The upload as rows keyed by column; 400 (413 when too large) with the reason otherwise. */
export function readAssessmentCsv(file: UploadedFile | undefined): CsvRow[] {
  return readUploadedCsv(file, {
    columns: ASSESSMENT_IMPORT_COLUMNS,
    required: REQUIRED,
    maxBytes: ASSESSMENT_IMPORT_MAX_BYTES,
    maxRows: ASSESSMENT_IMPORT_MAX_ROWS,
  });
}

const FIELD_COLUMN: Record<string, Column> = { date: 'date', response: 'response', notes: 'notes', reason: 'correction_reason' };

function errorsOf(error: unknown): AssessmentRowResult['errors'] {
  if (error instanceof RowError) return error.errors as AssessmentRowResult['errors'];
  if (error instanceof ValidationError) {
    return (error.inner.length ? error.inner : [error]).map((e) => ({ column: FIELD_COLUMN[e.path ?? ''] ?? 'row', reason: e.message }));
  }
  if (error instanceof AppError) {
    const fields = Object.entries((error.extra.fields ?? {}) as Record<string, string>);
    if (fields.length) return fields.map(([field, reason]) => ({ column: FIELD_COLUMN[field] ?? 'row', reason: `${error.message} ${reason}` }));
    return [{ column: 'row', reason: error.message }];
  }
  throw error;
}

async function applyRow(trx: Knex.Transaction, actor: Actor, row: CsvRow): Promise<Omit<AssessmentRowResult, 'line' | 'errors'>> {
  const refused = ASSESSMENT_IMPORT_COLUMNS.filter((c) => !TEXT_COLUMNS.includes(c) && startsLikeFormula(row[c]));
  if (refused.length) {
    throw new RowError(refused.map((column) => ({ column, reason: `Starts with "${row[column][0]}", as a spreadsheet formula would; this column takes a fixed format.` })));
  }
  const studyId = row.study_id.toUpperCase();
  if (!studyId) throw new RowError([{ column: 'study_id', reason: 'The study ID is required.' }]);
  const patient = await findPatientByStudyId(trx, actor.access.trialId, studyId, { forUpdate: true });
  if (!patient || !writableSites(actor.access).includes(patient.siteId)) {
    throw new RowError([{ column: 'study_id', reason: `${studyId} is not a patient of your sites on this trial.` }]);
  }
  const input = await assessmentSchema(patient.enrolledOn).validate(
    { date: row.date, response: row.response.toUpperCase(), notes: row.notes ? neutralise(row.notes) : null },
    { abortEarly: false, stripUnknown: true },
  );
  const values = { date: input.date, response: input.response, notes: input.notes || null };
  const base = { studyId, date: values.date, patientId: patient.id };
  const existing = await findAssessmentOn(trx, patient.id, values.date);
  if (!existing) {
    await createAssessment(trx, patient, values, actor.user.id, 'Imported from a CSV file');
    return { ...base, result: 'new' };
  }
  if (existing.response === values.response && existing.notes === values.notes) return { ...base, result: 'unchanged' };
  if (!row.correction_reason) {
    throw new RowError([
      {
        column: 'response',
        reason: `${studyId} already has ${existing.response} on ${existing.date}${existing.notes !== values.notes ? ' with other notes' : ''}; give a correction_reason to change it.`,
      },
    ]);
  }
  await applyCorrection(trx, existing, values, actor.user.id, neutralise(row.correction_reason));
  return { ...base, result: 'update' };
}

/** Applies the file in one transaction; rolls back on a dry run or on any row error (then 422 with the report). */
export async function importAssessments(db: Db, actor: Actor, rows: CsvRow[], options: { dryRun: boolean }): Promise<AssessmentImportReport> {
  const seen = new Map<string, number>();
  return runImport<AssessmentRowResult, { derivationsChanged: number }>(db, { dryRun: options.dryRun, total: rows.length }, async (trx, add) => {
    const touched = new Set<string>();
    for (const [index, row] of rows.entries()) {
      const line = index + 2;
      const key = `${row.study_id.toUpperCase()} ${row.date}`;
      if (seen.has(key)) {
        add({ line, studyId: row.study_id.toUpperCase(), date: row.date, result: 'error', errors: [{ column: 'date', reason: `The same patient and date appear on line ${seen.get(key)}.` }] });
        continue;
      }
      seen.set(key, line);
      try {
        const result: AssessmentRowResult = { line, errors: [], ...(await trx.transaction((savepoint) => applyRow(savepoint, actor, row))) };
        if (result.result !== 'unchanged' && result.patientId) touched.add(result.patientId);
        add(result);
      } catch (error) {
        add({ line, studyId: row.study_id.toUpperCase(), date: row.date, result: 'error', errors: errorsOf(error) });
      }
    }
    let derivationsChanged = 0;
    for (const patientId of touched) {
      const before = await findPatientById(trx, patientId, { forUpdate: true });
      const after = await recomputeDerivation(trx, patientId, { actorUserId: actor.user.id, fromAssessmentChange: true });
      if (before?.derivedBestOverallResponse !== after.bestOverallResponse || before?.derivedResponder !== after.responder) derivationsChanged += 1;
    }
    return { derivationsChanged };
  });
}
