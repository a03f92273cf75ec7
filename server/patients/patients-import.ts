/**
 * CSV import of patients and outcomes from a site's own spreadsheet. The upload is checked (size,
 * type, text encoding, exact columns, row count), then every row is applied through the same
 * service functions as the forms, inside the shared import skeleton (server/csv/import.ts: one
 * transaction, all-or-nothing, a dry run rolled back): new patients together through
 * `enrolPatients`, known patients' changes together through `planOutcome` and `writeOutcomes`
 * (in two turns where a cohort's stage 1 completes among them). Text cells that start
 * like a spreadsheet formula are stored with a leading quote; cells of fixed-format columns that do
 * are refused.
 */
import type { Db } from '../db/knex.js';
import { ValidationError } from 'yup';
import { AppError, InputError } from '../http/errors.js';
import { RowError, runImport, type ImportCounts } from '../csv/import.js';
import { neutralise, startsLikeFormula, toCsv } from '../csv/neutralise.js';
import { readUploadedCsv, type UploadedFile } from '../csv/upload.js';
import {
  IMPORT_COLUMNS,
  IMPORT_MAX_BYTES,
  IMPORT_MAX_ROWS,
  isCalendarDay,
  latestToday,
  outcomeSchema,
  STUDY_ID_PATTERN,
  type Outcome,
} from './patients.schema.js';
import { siteScope, writableSites, type Actor } from '../auth/access.js';
import type { Hooks } from '../hooks.js';
import { listCohorts, trialFacts, type CohortStatus, type TrialFacts } from '../trials/index.js';
import { countablePatients, findPatientsByStudyIds, listPatients, type Patient } from './patients.repository.js';
import { enrolPatients, planOutcome, writeOutcomes, type OutcomePlan } from './patients.service.js';
import { replayCohort } from './accrual-rules.js';
import { currentDesigns } from '../designs/index.js';

export type ImportColumn = (typeof IMPORT_COLUMNS)[number];
export type RowResult = {
  line: number;
  studyId: string;
  result: 'new' | 'update' | 'unchanged' | 'error';
  errors: Array<{ column: ImportColumn | 'row'; reason: string }>;
  patientId?: string;
  correction?: boolean;
  attestationCleared?: boolean;
};
export type { ImportCounts };
export type ImportReport = { dryRun: boolean; committed: boolean; counts: ImportCounts; rows: RowResult[]; pausedCohorts: string[] };

const TEXT_COLUMNS: ImportColumn[] = ['not_evaluable_reason', 'correction_reason'];

export function importTemplate(): string {
  return toCsv([...IMPORT_COLUMNS], []);
}

/** Checks the upload is a CSV text file with exactly the template's columns; 400 (413 when too large) otherwise. */
export const readCsv = (file: UploadedFile | undefined): Array<Record<ImportColumn, string>> =>
  readUploadedCsv(file, { columns: IMPORT_COLUMNS, maxBytes: IMPORT_MAX_BYTES, maxRows: IMPORT_MAX_ROWS });

const FIELD_COLUMN: Record<string, ImportColumn> = {
  studyId: 'study_id',
  siteId: 'site_code',
  cohortId: 'cohort_code',
  enrolledOn: 'enrolled_on',
  outcome: 'outcome',
  bestOverallResponse: 'best_overall_response',
  responseAssessedOn: 'response_assessed_on',
  evaluable: 'evaluable',
  notEvaluableReason: 'not_evaluable_reason',
  reason: 'correction_reason',
  correction_reason: 'correction_reason',
};

const OUTCOME_WORDS: Record<string, Outcome> = {
  '': 'pending',
  pending: 'pending',
  responder: 'responder',
  non_responder: 'non_responder',
  'non-responder': 'non_responder',
  'non responder': 'non_responder',
  nonresponder: 'non_responder',
};
const YES = new Set(['', 'yes', 'y', 'true', '1']);
const NO = new Set(['no', 'n', 'false', '0']);

function errorsOf(error: unknown): RowResult['errors'] {
  if (error instanceof RowError) return error.errors as RowResult['errors'];
  if (error instanceof ValidationError) {
    return (error.inner.length ? error.inner : [error]).map((e) => ({ column: FIELD_COLUMN[e.path ?? ''] ?? 'row', reason: e.message }));
  }
  if (error instanceof AppError) {
    const fields = (error.extra.fields ?? {}) as Record<string, string>;
    const entries = Object.entries(fields);
    if (entries.length) return entries.map(([field, reason]) => ({ column: FIELD_COLUMN[field] ?? 'row', reason }));
    return [{ column: error.status === 404 ? 'site_code' : 'row', reason: error.message }];
  }
  throw error;
}

/** The row's cells as service input; format problems are collected per column. */
async function readRow(row: Record<ImportColumn, string>, facts: TrialFacts, actor: Actor) {
  const errors: RowResult['errors'] = [];
  for (const column of IMPORT_COLUMNS) {
    if (!TEXT_COLUMNS.includes(column) && startsLikeFormula(row[column])) {
      errors.push({ column, reason: `Starts with "${row[column][0]}", as a spreadsheet formula would; this column takes a fixed format, so the cell is refused.` });
    }
  }
  if (errors.length) throw new RowError(errors);
  const studyId = row.study_id.toUpperCase();
  if (!STUDY_ID_PATTERN.test(studyId)) errors.push({ column: 'study_id', reason: 'The study ID is the site code, a dash and a number, e.g. RVG-014.' });
  if (row.enrolled_on && !isCalendarDay(row.enrolled_on)) errors.push({ column: 'enrolled_on', reason: 'The enrolment date must be a real date (YYYY-MM-DD).' });
  else if (row.enrolled_on > latestToday()) errors.push({ column: 'enrolled_on', reason: 'The enrolment date cannot be in the future.' });
  const site = facts.sites.find((s) => s.code === row.site_code.toUpperCase());
  if (!row.site_code) errors.push({ column: 'site_code', reason: 'The site code is required.' });
  else if (!site || !writableSites(actor.access).includes(site.id)) errors.push({ column: 'site_code', reason: `${row.site_code} is not one of your sites on this trial; import only your own sites' patients.` });
  let cohortId: string | null = null;
  if (row.cohort_code) {
    const cohort = facts.cohorts.find((c) => c.code.toUpperCase() === row.cohort_code.toUpperCase());
    if (!cohort) errors.push({ column: 'cohort_code', reason: `No cohort ${row.cohort_code} in this trial.` });
    else cohortId = cohort.id;
  } else if (facts.cohorts.length > 1) errors.push({ column: 'cohort_code', reason: 'This trial has several cohorts: give the cohort code.' });
  const outcome = OUTCOME_WORDS[row.outcome.toLowerCase()];
  if (!outcome) errors.push({ column: 'outcome', reason: 'Use pending, responder or non_responder.' });
  const evaluableText = row.evaluable.toLowerCase();
  if (!YES.has(evaluableText) && !NO.has(evaluableText)) errors.push({ column: 'evaluable', reason: 'Use yes or no.' });
  if (errors.length) throw new RowError(errors);
  const fields = await outcomeSchema.validate(
    {
      version: 1,
      outcome,
      bestOverallResponse: row.best_overall_response.toUpperCase() || null,
      responseAssessedOn: row.response_assessed_on || null,
      evaluable: !NO.has(evaluableText),
      notEvaluableReason: row.not_evaluable_reason ? neutralise(row.not_evaluable_reason) : null,
      reason: row.correction_reason ? neutralise(row.correction_reason) : null,
    },
    { abortEarly: false, context: { enrolledOn: row.enrolled_on || undefined } },
  );
  return { studyId, siteId: (site as { id: string }).id, cohortId, fields };
}

type ReadRow = { index: number; line: number; row: Record<ImportColumn, string>; cells: Awaited<ReturnType<typeof readRow>> };

const enrolRequest = ({ row, cells: { studyId, siteId, cohortId, fields } }: ReadRow) => ({
  studyId,
  siteId,
  cohortId,
  enrolledOn: row.enrolled_on,
  outcome: fields.outcome,
  bestOverallResponse: fields.bestOverallResponse,
  responseAssessedOn: fields.responseAssessedOn,
  evaluable: fields.evaluable,
  notEvaluableReason: fields.notEvaluableReason,
});

/** A known patient's row, checked for identity against the patient as found (a row error otherwise). */
function checkKnown(actor: Actor, { row, cells }: ReadRow, existing: Patient): void {
  const { studyId, siteId, cohortId } = cells;
  if (!writableSites(actor.access).includes(existing.siteId)) throw new RowError([{ column: 'study_id', reason: `${studyId} is not a patient of your sites.` }]);
  const identity: RowResult['errors'] = [];
  if (existing.siteId !== siteId) identity.push({ column: 'site_code', reason: `${studyId} is a patient of ${existing.siteCode}; the site cannot be changed by import.` });
  if (cohortId && existing.cohortId !== cohortId) identity.push({ column: 'cohort_code', reason: `${studyId} is in cohort ${existing.cohortCode}; the cohort cannot be changed by import.` });
  if (row.enrolled_on && row.enrolled_on !== existing.enrolledOn) identity.push({ column: 'enrolled_on', reason: `${studyId} was enrolled on ${existing.enrolledOn}; the enrolment date cannot be changed by import.` });
  if (identity.length) throw new RowError(identity);
}

/**
 * Applies the file in one transaction; rolls back on a dry run or on any row error (then 422 with
 * the report). Every row is read in memory first and the known patients are found (and locked) in
 * one look-up. Then the rows apply in file order, so each meets the trial as the rows above it
 * left it: new patients are enrolled together by the same rules as the form (`enrolPatients`), and
 * the interim pause refuses the rows after the one that completes stage 1; known patients' changes
 * are written together by the same rules as the form (`planOutcome`, `writeOutcomes`), each judged
 * against the patient as it then stands: where a change of evaluability can move the stages (a
 * two-stage design counting the evaluable population), the stage each later row meets is replayed
 * in memory (`replayCohort`), and a cohort's changes after the one completing its stage 1 are
 * written after that one's interim review has started.
 */
export async function importPatients(db: Db, hooks: Hooks, actor: Actor, rows: Array<Record<ImportColumn, string>>, options: { dryRun: boolean }): Promise<ImportReport> {
  return runImport<RowResult, { pausedCohorts: string[] }>(db, { dryRun: options.dryRun, total: rows.length }, async (trx, add) => {
    const facts = await trialFacts(trx, actor.access.trialId);
    if (!facts) throw new InputError('The trial was not found.');
    const results: RowResult[] = [];
    const refuse = (index: number, studyId: string, errors: RowResult['errors']) => (results[index] = { line: index + 2, studyId, result: 'error', errors });

    const read: ReadRow[] = [];
    const firstLine = new Map<string, number>();
    for (const [index, row] of rows.entries()) {
      const line = index + 2;
      const studyId = row.study_id.toUpperCase();
      const seenAt = firstLine.get(studyId);
      if (studyId && seenAt) {
        refuse(index, studyId, [{ column: 'study_id', reason: `${studyId} appears again (first on line ${seenAt}); give each patient one row.` }]);
        continue;
      }
      if (studyId) firstLine.set(studyId, line);
      try {
        read.push({ index, line, row, cells: await readRow(row, facts, actor) });
      } catch (error) {
        refuse(index, studyId, errorsOf(error));
      }
    }

    const known = await findPatientsByStudyIds(trx, actor.access.trialId, read.map((r) => r.cells.studyId), { forUpdate: true });
    // The designs in force (the import signs none).
    const designs = await currentDesigns(trx, facts.cohorts.map((c) => c.id));
    // Rows wait to be applied together until a row of the other kind comes: new patients, or known ones (`planOutcome` tells the unchanged).
    let newcomers: ReadRow[] = [];
    let knownRows: ReadRow[] = [];
    const enrolWaiting = async () => {
      const enrolled = await enrolPatients(trx, hooks, actor, newcomers.map(enrolRequest), facts);
      enrolled.forEach((result, i) => {
        const { index, line, cells } = newcomers[i];
        if ('error' in result) refuse(index, cells.studyId, errorsOf(result.error));
        else results[index] = { line, studyId: cells.studyId, result: 'new', errors: [], patientId: result.patient.id };
      });
      newcomers = [];
    };
    const applyKnownWaiting = async () => {
      // The patients as they now stand (locked since the look-up): a restage above may have moved their stage.
      const current = await findPatientsByStudyIds(trx, actor.access.trialId, knownRows.map((r) => r.cells.studyId));
      const planned: Array<{ r: ReadRow; plan: OutcomePlan }> = [];
      for (const r of knownRows) {
        const patient = current.get(r.cells.studyId) as Patient;
        try {
          const plan = planOutcome(actor, patient, { ...r.cells.fields, version: patient.version }, 'correction_reason');
          if (plan) planned.push({ r, plan });
          else results[r.index] = { line: r.line, studyId: r.cells.studyId, result: 'unchanged', errors: [], patientId: patient.id };
        } catch (error) {
          refuse(r.index, r.cells.studyId, errorsOf(error));
        }
      }
      for (const plans of await inTurns(planned.map(({ plan }) => plan))) await writeOutcomes(trx, hooks, actor, plans, { trialCode: facts.code });
      for (const { r, plan } of planned) {
        results[r.index] = { line: r.line, studyId: r.cells.studyId, result: 'update', errors: [], patientId: plan.before.id, correction: plan.correction, attestationCleared: plan.attestationCleared };
      }
      knownRows = [];
    };
    /**
     * The changes in two turns, written as one row after another would leave them: each cohort's
     * changes up to the one at which its stage 1 completes (the interim review starts there, its
     * e-mail counting what that row left), then the rest. Where a two-stage design can move
     * stages, each change meets its patient at the stage the changes above it left
     * (`replayCohort`), for its audit row; the stored stages follow once per turn.
     */
    const inTurns = async (plans: OutcomePlan[]): Promise<OutcomePlan[][]> => {
      const cohorts = [...new Set(plans.map((plan) => plan.before.cohortId))];
      const twoStage = cohorts.filter((id) => designs.get(id)?.n1 != null);
      if (twoStage.length === 0) return [plans];
      const [countable, statuses] = [await countablePatients(trx, twoStage), new Map((await listCohorts(trx, actor.access.trialId)).map((c) => [c.id, c.status]))];
      const turns: OutcomePlan[][] = [[], []];
      for (const cohortId of cohorts) {
        const inCohort = plans.filter((plan) => plan.before.cohortId === cohortId);
        if (!twoStage.includes(cohortId)) {
          turns[0].push(...inCohort);
          continue;
        }
        const replay = replayCohort(
          designs.get(cohortId),
          statuses.get(cohortId) as CohortStatus,
          countable.get(cohortId) ?? [],
          new Map(inCohort.map((plan) => [plan.before.id, plan.before.stage])),
          inCohort.map((plan) => ({ patientId: plan.before.id, evaluable: plan.next.evaluable })),
        );
        inCohort.forEach((plan, i) => {
          const turn = replay.completesStageOne !== undefined && i > replay.completesStageOne ? 1 : 0;
          turns[turn].push({ ...plan, before: { ...plan.before, stage: replay.stages[i] } });
        });
      }
      return turns.filter((turn) => turn.length > 0);
    };
    for (const r of read) {
      const existing = known.get(r.cells.studyId);
      if (!existing) {
        if (knownRows.length > 0) await applyKnownWaiting();
        if (r.row.enrolled_on) newcomers.push(r);
        else refuse(r.index, r.cells.studyId, [{ column: 'enrolled_on', reason: 'A new patient needs the enrolment date.' }]);
        continue;
      }
      if (newcomers.length > 0) await enrolWaiting();
      try {
        checkKnown(actor, r, existing);
      } catch (error) {
        refuse(r.index, r.cells.studyId, errorsOf(error));
        continue;
      }
      knownRows.push(r);
    }
    if (newcomers.length > 0) await enrolWaiting();
    if (knownRows.length > 0) await applyKnownWaiting();
    results.forEach(add);

    const paused = (await listCohorts(trx, actor.access.trialId)).filter((c) => c.status === 'interim_review').map((c) => c.code);
    return { pausedCohorts: paused.filter((code) => facts.cohorts.find((c) => c.code === code)?.status !== 'interim_review') };
  });
}

/** The patients the actor may see, in the import's columns, so a site can edit its export and import it back. */
export async function patientsExport(db: Db, actor: Actor): Promise<string> {
  const { patients } = await listPatients(db, actor.access.trialId, siteScope(actor.access), { sort: 'studyId', dir: 'asc', page: 1, pageSize: 100_000 });
  return toCsv(
    [...IMPORT_COLUMNS],
    patients.map((p) => [
      p.studyId,
      p.siteCode,
      p.cohortCode,
      p.enrolledOn,
      p.outcome,
      p.bestOverallResponse,
      p.responseAssessedOn,
      p.evaluable ? 'yes' : 'no',
      p.notEvaluableReason,
      '',
    ]),
  );
}
