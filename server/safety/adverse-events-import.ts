/**
 * CSV import of adverse events, one row per event (study_id, onset_on, term, grade, attribution,
 * serious, outcome, notes, correction_reason). The upload is checked (type, size, UTF-8, exact
 * columns, row count); every row goes through the same checks as the form, inside the shared import
 * skeleton (server/csv/import.ts: one transaction, a savepoint per row, all-or-nothing, a dry run
 * rolled back). A row names an event by patient, onset date and term (letter case aside): it is
 * unchanged when it matches, a correction when it differs and gives a reason, an error otherwise.
 * Each cohort touched is then held against its safety rule once, so a file that crosses the rule
 * pauses accrual in the same transaction (and a dry run says it would). Text cells that start like
 * a spreadsheet formula are stored with a leading quote; fixed-format cells that do are refused.
 */
import type { Knex } from 'knex';
import { ValidationError } from 'yup';
import type { Db } from '../db/knex.js';
import { AppError } from '../http/errors.js';
import { RowError, runImport, type ImportCounts } from '../csv/import.js';
import { writableSites, type Actor } from '../auth/access.js';
import { neutralise, startsLikeFormula, toCsv } from '../csv/neutralise.js';
import { readUploadedCsv, type UploadedFile } from '../csv/upload.js';
import { findPatientByStudyId } from '../patients/index.js';
import { listCohorts } from '../trials/index.js';
import { ATTRIBUTIONS, EVENT_IMPORT_COLUMNS, EVENT_IMPORT_MAX_BYTES, EVENT_IMPORT_MAX_ROWS, EVENT_OUTCOMES, eventSchema } from './safety.schema.js';
import { EVENT_FIELDS, findEventByKey, type EventFields } from './adverse-events.repository.js';
import { applyEventCorrection, createEvent } from './adverse-events.service.js';
import { applySafetyRules } from './safety-rules.js';

type Column = (typeof EVENT_IMPORT_COLUMNS)[number];
type CsvRow = Record<Column, string>;
const REQUIRED: Column[] = ['study_id', 'onset_on', 'term', 'grade', 'attribution', 'serious', 'outcome'];
const TEXT_COLUMNS: Column[] = ['term', 'notes', 'correction_reason'];

export type EventRowResult = {
  line: number;
  studyId: string;
  onsetOn: string;
  term: string;
  result: 'new' | 'update' | 'unchanged' | 'error';
  errors: Array<{ column: Column | 'row'; reason: string }>;
  eventId?: string;
  attestationCleared?: boolean;
};
export type EventImportReport = {
  dryRun: boolean;
  committed: boolean;
  counts: ImportCounts;
  rows: EventRowResult[];
  /** Cohorts whose accrual this file pauses (on a dry run: would pause) by crossing their safety rule. */
  pausedCohorts: string[];
};

export function eventImportTemplate(): string {
  return toCsv([...EVENT_IMPORT_COLUMNS], []);
}

export function readEventCsv(file: UploadedFile | undefined): CsvRow[] {
  return readUploadedCsv(file, { columns: EVENT_IMPORT_COLUMNS, required: REQUIRED, maxBytes: EVENT_IMPORT_MAX_BYTES, maxRows: EVENT_IMPORT_MAX_ROWS });
}

const FIELD_COLUMN: Record<string, Column> = {
  onsetOn: 'onset_on',
  term: 'term',
  grade: 'grade',
  attribution: 'attribution',
  serious: 'serious',
  outcome: 'outcome',
  notes: 'notes',
  reason: 'correction_reason',
};

function errorsOf(error: unknown): EventRowResult['errors'] {
  if (error instanceof RowError) return error.errors as EventRowResult['errors'];
  if (error instanceof ValidationError) {
    return (error.inner.length ? error.inner : [error]).map((e) => ({ column: FIELD_COLUMN[e.path ?? ''] ?? 'row', reason: e.message }));
  }
  if (error instanceof AppError) {
    const fields = Object.entries((error.extra.fields ?? {}) as Record<string, string>);
    if (fields.length) return fields.map(([field, reason]) => ({ column: FIELD_COLUMN[field] ?? 'row', reason }));
    return [{ column: 'row', reason: error.message }];
  }
  throw error;
}

const YES = new Set(['yes', 'y', 'true', '1']);
const NO = new Set(['no', 'n', 'false', '0']);
const ATTRIBUTION_CELLS: Record<string, string> = {
  ...Object.fromEntries(ATTRIBUTIONS.map((a) => [a, a])),
  'not related': 'unrelated',
  'unlikely related': 'unlikely',
  possibly: 'possible',
  'possibly related': 'possible',
  probably: 'probable',
  'probably related': 'probable',
  definitely: 'definite',
  'definitely related': 'definite',
};

/** The row's cells as the form would send them; cells that are not of their column's kind are reported per column. */
function readCells(row: CsvRow): Record<string, unknown> {
  const errors: EventRowResult['errors'] = [];
  for (const column of EVENT_IMPORT_COLUMNS) {
    if (!TEXT_COLUMNS.includes(column) && startsLikeFormula(row[column])) {
      errors.push({ column, reason: `Starts with "${row[column][0]}", as a spreadsheet formula would; this column takes a fixed format.` });
    }
  }
  if (errors.length) throw new RowError(errors);
  const serious = row.serious.toLowerCase();
  if (!YES.has(serious) && !NO.has(serious)) errors.push({ column: 'serious', reason: 'Use yes or no.' });
  const attribution = row.attribution.trim().toLowerCase();
  if (attribution && !ATTRIBUTION_CELLS[attribution]) errors.push({ column: 'attribution', reason: 'Use unrelated, unlikely, possible, probable or definite (or leave it empty until assessed).' });
  const outcome = row.outcome.trim().toLowerCase().replace(/[\s-]+/g, '_');
  if (outcome && !(EVENT_OUTCOMES as readonly string[]).includes(outcome)) {
    errors.push({ column: 'outcome', reason: 'Use recovered, recovering, not_recovered, recovered_with_sequelae, fatal or unknown.' });
  }
  if (errors.length) throw new RowError(errors);
  return {
    onsetOn: row.onset_on,
    term: row.term ? neutralise(row.term) : '',
    grade: row.grade,
    attribution: ATTRIBUTION_CELLS[attribution] ?? null,
    serious: YES.has(serious),
    outcome: outcome || 'unknown',
    notes: row.notes ? neutralise(row.notes) : null,
  };
}

async function applyRow(trx: Knex.Transaction, actor: Actor, row: CsvRow): Promise<Omit<EventRowResult, 'line' | 'errors'> & { cohortId: string }> {
  const studyId = row.study_id.toUpperCase();
  if (!studyId) throw new RowError([{ column: 'study_id', reason: 'The study ID is required.' }]);
  const cells = readCells(row);
  const patient = await findPatientByStudyId(trx, actor.access.trialId, studyId, { forUpdate: true });
  if (!patient || !writableSites(actor.access).includes(patient.siteId)) {
    throw new RowError([{ column: 'study_id', reason: `${studyId} is not a patient of your sites on this trial.` }]);
  }
  const input = await eventSchema(patient.enrolledOn).validate(cells, { abortEarly: false, stripUnknown: true });
  const values: EventFields = { ...input, notes: input.notes ?? null };
  const base = { studyId, onsetOn: values.onsetOn, term: values.term, cohortId: patient.cohortId };
  const existing = await findEventByKey(trx, patient.id, values.onsetOn, values.term);
  if (!existing) {
    const event = await createEvent(trx, patient, values, actor.user.id, 'Imported from a CSV file');
    return { ...base, result: 'new', eventId: event.id };
  }
  // The stored term keeps its letter case unless the row changes something else too.
  const changes = { ...values, term: existing.term };
  if (EVENT_FIELDS.every((field) => changes[field] === existing[field])) return { ...base, result: 'unchanged', eventId: existing.id };
  if (!row.correction_reason) {
    throw new RowError([{ column: 'correction_reason', reason: `${studyId} already has "${existing.term}" with onset on ${existing.onsetOn} with other values; give a correction_reason to change it.` }]);
  }
  const { attestationCleared } = await applyEventCorrection(trx, existing, changes, actor.user.id, neutralise(row.correction_reason));
  return { ...base, result: 'update', eventId: existing.id, attestationCleared };
}

/** Applies the file in one transaction; rolls back on a dry run or on any row error (then 422 with the report). */
export async function importEvents(db: Db, actor: Actor, rows: CsvRow[], options: { dryRun: boolean }): Promise<EventImportReport> {
  const seen = new Map<string, number>();
  return runImport<EventRowResult, { pausedCohorts: string[] }>(db, { dryRun: options.dryRun, total: rows.length }, async (trx, add) => {
    const touched = new Set<string>();
    for (const [index, row] of rows.entries()) {
      const line = index + 2;
      const identity = { studyId: row.study_id.toUpperCase(), onsetOn: row.onset_on, term: row.term };
      const key = `${identity.studyId}|${row.onset_on}|${row.term.trim().toLowerCase()}`;
      if (seen.has(key)) {
        add({ line, ...identity, result: 'error', errors: [{ column: 'term', reason: `The same patient, onset and term appear on line ${seen.get(key)}.` }] });
        continue;
      }
      seen.set(key, line);
      try {
        const { cohortId, ...result } = await trx.transaction((savepoint) => applyRow(savepoint, actor, row));
        if (result.result !== 'unchanged') touched.add(cohortId);
        add({ line, errors: [], ...result });
      } catch (error) {
        add({ line, ...identity, result: 'error', errors: errorsOf(error) });
      }
    }
    const codes = new Map((await listCohorts(trx, actor.access.trialId)).map((c) => [c.id, c.code]));
    const pausedCohorts: string[] = [];
    for (const cohortId of touched) {
      const { paused } = await applySafetyRules(trx, { trialId: actor.access.trialId, cohortId, actorUserId: actor.user.id });
      if (paused) pausedCohorts.push(codes.get(cohortId) ?? cohortId);
    }
    return { pausedCohorts };
  });
}
