/**
 * The patients store: the only module that reads or writes the patients table (enrolment, outcome,
 * attestation, stage, and the outcome derived from assessments). Reads return camelCase domain
 * objects through one mapper, with the site, cohort and attestation joined in; filtering, sorting
 * and paging of the list happen in SQL so a trial of thousands of patients pages quickly.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Derivation } from '../assessments/index.js';
import type { CountablePatient } from '../evaluation/index.js';
import type { BestOverallResponse, ListQuery, Outcome } from './patients.schema.js';

type Conn = Db | Knex.Transaction;

// Kept for the client, which still imports these names from here; they live in the trials and audit stores.
export type { SiteRef as TrialSite, CohortRef as TrialCohort } from '../trials/index.js';
export type { HistoryEntry } from '../audit/index.js';
/** 'all' for roles that read every site; otherwise the site ids the user holds a site role at. */
export type SiteScope = string[] | 'all';

export type Attestation = { signatureId: string; signerEmail: string; signerName: string | null; signedAt: string };

export type Patient = {
  id: string;
  trialId: string;
  studyId: string;
  siteId: string;
  siteCode: string;
  cohortId: string;
  cohortCode: string;
  stage: 1 | 2;
  enrolmentSeq: number;
  enrolledOn: string;
  outcome: Outcome;
  bestOverallResponse: BestOverallResponse | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  notEvaluableReason: string | null;
  attested: Attestation | null;
  version: number;
  derivedBestOverallResponse: BestOverallResponse | null;
  derivedResponder: boolean | null;
  derivation: unknown;
  outcomeFlag: string | null;
  updatedAt: string;
};

/** A patient as the patient page lists it: everything but the derivation's reasoning, which the patient's own record carries. */
export type ListedPatient = Omit<Patient, 'derivation'>;

type PatientRow = {
  id: string;
  trial_id: string;
  study_id: string;
  site_id: string;
  site_code: string;
  cohort_id: string;
  cohort_code: string;
  stage: 1 | 2;
  enrolment_seq: number;
  enrolled_on: string;
  outcome: Outcome;
  best_overall_response: BestOverallResponse | null;
  response_assessed_on: string | null;
  evaluable: boolean;
  not_evaluable_reason: string | null;
  attestation_signature_id: string | null;
  signer_email: string | null;
  printed_name: string | null;
  signer_name: string | null;
  signed_at: Date | null;
  version: number;
  derived_best_overall_response: BestOverallResponse | null;
  derived_responder: boolean | null;
  derivation: unknown;
  outcome_flag: string | null;
  updated_at: Date;
};

function toPatient(row: PatientRow): Patient {
  return {
    id: row.id,
    trialId: row.trial_id,
    studyId: row.study_id,
    siteId: row.site_id,
    siteCode: row.site_code,
    cohortId: row.cohort_id,
    cohortCode: row.cohort_code,
    stage: row.stage,
    enrolmentSeq: row.enrolment_seq,
    enrolledOn: row.enrolled_on,
    outcome: row.outcome,
    bestOverallResponse: row.best_overall_response,
    responseAssessedOn: row.response_assessed_on,
    evaluable: row.evaluable,
    notEvaluableReason: row.not_evaluable_reason,
    attested:
      row.attestation_signature_id && row.signed_at
        ? // The printed name as it was at signing; older signatures fall back to the person's name now.
          { signatureId: row.attestation_signature_id, signerEmail: row.signer_email ?? '', signerName: row.printed_name ?? row.signer_name, signedAt: row.signed_at.toISOString() }
        : null,
    version: row.version,
    derivedBestOverallResponse: row.derived_best_overall_response,
    derivedResponder: row.derived_responder,
    derivation: row.derivation,
    outcomeFlag: row.outcome_flag,
    updatedAt: row.updated_at.toISOString(),
  };
}

function baseQuery(db: Conn) {
  return joined(db.queryBuilder(), 'patients as p');
}

/** Patient rows (`from`, aliased p) with their site, cohort and attestation. */
function joined(query: Knex.QueryBuilder, from: string) {
  return query
    .from(from)
    .join('sites as s', 's.id', 'p.site_id')
    .join('cohorts as c', 'c.id', 'p.cohort_id')
    .leftJoin('signatures as sig', 'sig.id', 'p.attestation_signature_id')
    .leftJoin('users as su', 'su.id', 'sig.signer_user_id');
}

const COLUMNS = [
  'p.id',
  'p.trial_id',
  'p.study_id',
  'p.site_id',
  's.code as site_code',
  'p.cohort_id',
  'c.code as cohort_code',
  'p.stage',
  'p.enrolment_seq',
  'p.enrolled_on',
  'p.outcome',
  'p.best_overall_response',
  'p.response_assessed_on',
  'p.evaluable',
  'p.not_evaluable_reason',
  'p.attestation_signature_id',
  'sig.signer_email',
  'sig.signer_name as printed_name',
  'su.name as signer_name',
  'sig.signed_at',
  'p.version',
  'p.derived_best_overall_response',
  'p.derived_responder',
  'p.derivation',
  'p.outcome_flag',
  'p.updated_at',
];

function scoped<Q extends Knex.QueryBuilder>(query: Q, scope: SiteScope): Q {
  return (scope === 'all' ? query : query.whereIn('p.site_id', scope)) as Q;
}

const SORT_SQL: Record<ListQuery['sort'], string[]> = {
  studyId: ["split_part(p.study_id, '-', 1)", "split_part(p.study_id, '-', 2)::int"],
  siteCode: ['s.code'],
  cohortCode: ['c.position'],
  stage: ['p.stage'],
  enrolledOn: ['p.enrolled_on'],
  outcome: ['p.outcome'],
  bestOverallResponse: ['p.best_overall_response'],
  responseAssessedOn: ['p.response_assessed_on'],
};

export type OutcomeCounts = { total: number; pending: number; responder: number; nonResponder: number; notEvaluable: number; unattested: number };

/** Which patients a page of the list holds, in order, with the selection's total and counts: the part of the list that reads every patient. */
export type PatientPage = { ids: string[]; total: number; counts: OutcomeCounts };

export async function listPatients(db: Conn, trialId: string, scope: SiteScope, query: ListQuery): Promise<{ patients: Patient[]; total: number; counts: OutcomeCounts }> {
  const { ids, total, counts } = await patientPage(db, trialId, scope, query);
  return { patients: await patientsInOrder(db, ids), total, counts };
}

export async function patientPage(db: Conn, trialId: string, scope: SiteScope, query: ListQuery): Promise<PatientPage> {
  // Everything but the outcome filter: the counts at the top show every outcome of the selection.
  const filtered = (q: Knex.QueryBuilder) => {
    scoped(q.where('p.trial_id', trialId), scope);
    if (query.siteId) q.where('p.site_id', query.siteId);
    if (query.cohortId) q.where('p.cohort_id', query.cohortId);
    if (query.stage) q.where('p.stage', query.stage);
    if (query.q) q.whereILike('p.study_id', `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`);
    if (query.status === 'evaluable') q.where('p.evaluable', true);
    if (query.status === 'not_evaluable') q.where('p.evaluable', false);
    if (query.status === 'attested') q.whereNotNull('p.attestation_signature_id');
    if (query.status === 'not_attested') q.whereNull('p.attestation_signature_id');
    if (query.status === 'flagged') q.whereNotNull('p.outcome_flag');
    return q;
  };
  // The filters read patients' own columns only, so the counts need no joins.
  const [countRow] = await filtered(db('patients as p')).select(
    db.raw('count(*)::int as total'),
    db.raw(`count(*) filter (where p.outcome = 'pending')::int as pending`),
    db.raw(`count(*) filter (where p.outcome = 'responder')::int as responder`),
    db.raw(`count(*) filter (where p.outcome = 'non_responder')::int as non_responder`),
    db.raw('count(*) filter (where not p.evaluable)::int as not_evaluable'),
    db.raw(`count(*) filter (where p.outcome <> 'pending' and p.attestation_signature_id is null)::int as unattested`),
  );
  const counts: OutcomeCounts = {
    total: countRow.total,
    pending: countRow.pending,
    responder: countRow.responder,
    nonResponder: countRow.non_responder,
    notEvaluable: countRow.not_evaluable,
    unattested: countRow.unattested,
  };
  const total = query.outcome ? (query.outcome === 'pending' ? counts.pending : query.outcome === 'responder' ? counts.responder : counts.nonResponder) : counts.total;
  // The page is chosen on the narrow rows first; only its patients get the joined columns.
  const page = filtered(db('patients as p'));
  if (query.sort === 'siteCode') page.join('sites as s', 's.id', 'p.site_id');
  if (query.sort === 'cohortCode') page.join('cohorts as c', 'c.id', 'p.cohort_id');
  if (query.outcome) page.where('p.outcome', query.outcome);
  const direction = query.dir === 'desc' ? 'desc' : 'asc';
  for (const expression of SORT_SQL[query.sort]) page.orderByRaw(`${expression} ${direction} nulls last`);
  page.orderBy('p.cohort_id').orderBy('p.enrolment_seq');
  const ids: string[] = (await page.limit(query.pageSize).offset((query.page - 1) * query.pageSize).pluck('p.id')) as string[];
  return { ids, total, counts };
}

/** The patients with these ids, in the order given (one gone since is left out). */
export async function patientsInOrder(db: Conn, ids: string[]): Promise<Patient[]> {
  const found: PatientRow[] = ids.length > 0 ? await baseQuery(db).whereIn('p.id', ids).select(COLUMNS) : [];
  const byId = new Map(found.map((row) => [row.id, row]));
  return ids.map((id) => byId.get(id)).filter((row): row is PatientRow => row !== undefined).map(toPatient);
}

/** One patient of the trial, or undefined when it does not exist or lies outside the user's sites. */
export async function findPatient(db: Conn, trialId: string, patientId: string, scope: SiteScope, options: { forUpdate?: boolean } = {}): Promise<Patient | undefined> {
  const query = scoped(baseQuery(db).where({ 'p.trial_id': trialId, 'p.id': patientId }), scope).first(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  const row: PatientRow | undefined = await query;
  return row ? toPatient(row) : undefined;
}

export async function findPatientByStudyId(db: Conn, trialId: string, studyId: string, options: { forUpdate?: boolean } = {}): Promise<Patient | undefined> {
  const query = baseQuery(db).where({ 'p.trial_id': trialId, 'p.study_id': studyId }).first(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  const row: PatientRow | undefined = await query;
  return row ? toPatient(row) : undefined;
}

/** The trial's patients with these study IDs, by study ID; with `forUpdate`, locked until the transaction ends. */
export async function findPatientsByStudyIds(db: Conn, trialId: string, studyIds: readonly string[], options: { forUpdate?: boolean } = {}): Promise<Map<string, Patient>> {
  if (studyIds.length === 0) return new Map();
  const query = baseQuery(db).where('p.trial_id', trialId).whereRaw('p.study_id = any(?)', [[...studyIds]]).orderBy('p.id').select(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  return new Map(((await query) as PatientRow[]).map((row) => [row.study_id, toPatient(row)]));
}

/** Patients by id alone, ordered by id; with `forUpdate`, locked until the transaction ends. */
export async function findPatientsByIds(db: Conn, patientIds: readonly string[], options: { forUpdate?: boolean } = {}): Promise<Patient[]> {
  if (patientIds.length === 0) return [];
  const query = baseQuery(db).whereRaw('p.id = any(?::uuid[])', [[...patientIds]]).orderBy('p.id').select(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  return ((await query) as PatientRow[]).map(toPatient);
}

/** A patient by id alone (the hooks of other features know the patient, not the trial). */
export async function findPatientById(db: Conn, patientId: string, options: { forUpdate?: boolean } = {}): Promise<Patient | undefined> {
  const query = baseQuery(db).where({ 'p.id': patientId }).first(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  const row: PatientRow | undefined = await query;
  return row ? toPatient(row) : undefined;
}

/** Every patient of the trial, ordered by id; with `forUpdate`, locked until the transaction ends. */
export async function listPatientsOfTrial(db: Conn, trialId: string, options: { forUpdate?: boolean } = {}): Promise<Patient[]> {
  const query = baseQuery(db).where({ 'p.trial_id': trialId }).orderBy('p.id').select(COLUMNS);
  if (options.forUpdate) query.forUpdate('p');
  return ((await query) as PatientRow[]).map(toPatient);
}

export type CohortPatientAssessment = { assessedOn: string; response: string; notes: string | null };

/** Every patient of the cohorts with their assessments in date order, as a data cut copies them. */
export async function listPatientsWithAssessments(db: Conn, cohortIds: string[]): Promise<Array<Patient & { assessments: CohortPatientAssessment[] }>> {
  if (cohortIds.length === 0) return [];
  const rows: Array<PatientRow & { assessments: CohortPatientAssessment[] | null }> = await baseQuery(db)
    .whereIn('p.cohort_id', cohortIds)
    .select(
      ...COLUMNS,
      db.raw(`coalesce((select jsonb_agg(jsonb_build_object('assessedOn', a.assessed_on, 'response', a.response, 'notes', a.notes)
                                           order by a.assessed_on)
                            from assessments a where a.patient_id = p.id), '[]'::jsonb) as assessments`),
    );
  return rows.map((row) => ({ ...toPatient(row), assessments: row.assessments ?? [] }));
}

export async function nextEnrolmentSeq(trx: Knex.Transaction, cohortId: string): Promise<number> {
  const [{ max }] = await trx('patients').where({ cohort_id: cohortId }).max({ max: 'enrolment_seq' });
  return Number(max ?? 0) + 1;
}

/** Enrolled patients per cohort. */
export async function countEnrolledByCohort(db: Conn, cohortIds: string[]): Promise<Map<string, number>> {
  if (cohortIds.length === 0) return new Map();
  const rows: Array<{ cohort_id: string; count: string }> = await db('patients')
    .whereIn('cohort_id', cohortIds)
    .groupBy('cohort_id')
    .select('cohort_id')
    .count({ count: '*' });
  return new Map(rows.map((row) => [row.cohort_id, Number(row.count)]));
}

export async function countPatientsInTrial(db: Conn, trialId: string): Promise<number> {
  const [{ count }] = await db('patients').where({ trial_id: trialId }).count({ count: '*' });
  return Number(count);
}

export async function countPatientsAtSite(db: Conn, siteId: string): Promise<number> {
  const [{ count }] = await db('patients').where({ site_id: siteId }).count({ count: '*' });
  return Number(count);
}

export async function countablePatients(db: Conn, cohortIds: string[]): Promise<Map<string, CountablePatient[]>> {
  const byCohort = new Map<string, CountablePatient[]>(cohortIds.map((id) => [id, []]));
  if (cohortIds.length === 0) return byCohort;
  const rows: Array<{ id: string; cohort_id: string; enrolment_seq: number; outcome: Outcome; evaluable: boolean }> = await db('patients')
    .whereIn('cohort_id', cohortIds)
    .orderBy('enrolment_seq')
    .select('id', 'cohort_id', 'enrolment_seq', 'outcome', 'evaluable');
  for (const row of rows) byCohort.get(row.cohort_id)?.push({ id: row.id, enrolmentSeq: row.enrolment_seq, outcome: row.outcome, evaluable: row.evaluable });
  return byCohort;
}

export async function currentStages(trx: Knex.Transaction, cohortId: string): Promise<Map<string, number>> {
  const rows: Array<{ id: string; stage: number }> = await trx('patients').where({ cohort_id: cohortId }).select('id', 'stage');
  return new Map(rows.map((r) => [r.id, r.stage]));
}

/** Stage is derived from enrolment order; it changes without a new version of the record. */
export async function setStage(trx: Knex.Transaction, patientIds: string[], stage: 1 | 2): Promise<void> {
  if (patientIds.length > 0) await trx('patients').whereIn('id', patientIds).update({ stage });
}

export type NewPatient = {
  trialId: string;
  cohortId: string;
  siteId: string;
  studyId: string;
  enrolledOn: string;
  enrolmentSeq: number;
  stage: 1 | 2;
  outcome: Outcome;
  bestOverallResponse: BestOverallResponse | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  notEvaluableReason: string | null;
  createdBy: string;
};

const newPatientRow = (p: NewPatient) => ({
  trial_id: p.trialId,
  cohort_id: p.cohortId,
  site_id: p.siteId,
  study_id: p.studyId,
  enrolled_on: p.enrolledOn,
  enrolment_seq: p.enrolmentSeq,
  stage: p.stage,
  outcome: p.outcome,
  best_overall_response: p.bestOverallResponse,
  response_assessed_on: p.responseAssessedOn,
  evaluable: p.evaluable,
  not_evaluable_reason: p.notEvaluableReason,
  created_by: p.createdBy,
});

/** Inserts the patients of one trial (a thousand per statement) and returns their ids in the order given, matched by study ID. */
export async function insertPatients(trx: Knex.Transaction, patients: readonly NewPatient[]): Promise<string[]> {
  const idOf = new Map<string, string>();
  for (let start = 0; start < patients.length; start += 1000) {
    const rows: Array<{ id: string; study_id: string }> = await trx('patients').insert(patients.slice(start, start + 1000).map(newPatientRow)).returning(['id', 'study_id']);
    for (const row of rows) idOf.set(row.study_id, row.id);
  }
  return patients.map((p) => idOf.get(p.studyId) as string);
}

export type OutcomeFields = {
  outcome: Outcome;
  bestOverallResponse: BestOverallResponse | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  notEvaluableReason: string | null;
};

/** One patient's outcome to write, if the patient is still at `version`. */
export type OutcomeWrite = { patientId: string; version: number; fields: OutcomeFields; clearAttestation: boolean };

/**
 * Writes outcomes (each only if its patient is still at its version), five hundred patients a
 * statement; answers the patients as written, with the same joins as every other read in the same
 * statement. A patient whose version moved on is missing from the answer.
 */
export async function updateOutcomes(trx: Knex.Transaction, writes: readonly OutcomeWrite[]): Promise<Patient[]> {
  const written: Patient[] = [];
  for (const part of chunks(writes)) {
    const update = trx.raw(
      `update patients as p
          set outcome = v.outcome, best_overall_response = v.bor, response_assessed_on = v.assessed_on, evaluable = v.evaluable,
              not_evaluable_reason = v.not_evaluable_reason,
              attestation_signature_id = case when v.clear_attestation then null else p.attestation_signature_id end,
              version = p.version + 1, updated_at = now()
         from (values ${part.map(() => '(?::uuid, ?::integer, ?::text, ?::text, ?::date, ?::boolean, ?::text, ?::boolean)').join(', ')})
              as v(id, version, outcome, bor, assessed_on, evaluable, not_evaluable_reason, clear_attestation)
        where p.id = v.id and p.version = v.version
        returning p.*`,
      part.flatMap((w) => [w.patientId, w.version, w.fields.outcome, w.fields.bestOverallResponse, w.fields.responseAssessedOn, w.fields.evaluable, w.fields.notEvaluableReason, w.clearAttestation]),
    );
    const rows: PatientRow[] = await joined(trx.with('p', update), 'p').select(COLUMNS);
    written.push(...rows.map(toPatient));
  }
  return written;
}

export async function setAttestation(trx: Knex.Transaction, patientId: string, version: number, signatureId: string): Promise<boolean> {
  const updated = await trx('patients')
    .where({ id: patientId, version })
    .update({ attestation_signature_id: signatureId, version: version + 1, updated_at: trx.fn.now() });
  return updated === 1;
}

/** What the derivation from timepoint assessments stores on a patient. */
export type DerivedColumns = {
  patientId: string;
  derivedBestOverallResponse: BestOverallResponse | null;
  derivedResponder: boolean | null;
  derivation: Derivation;
  /** The disagreement flag as the derivation leaves it (null where none). */
  outcomeFlag: string | null;
};

const CHUNK = 500;
const chunks = <T>(rows: readonly T[]) => Array.from({ length: Math.ceil(rows.length / CHUNK) }, (_, i) => rows.slice(i * CHUNK, (i + 1) * CHUNK));

/** Stores derivations and flags of many patients in a few statements (a trial-wide recompute touches thousands). */
export async function storeDerivations(trx: Knex.Transaction, rows: DerivedColumns[]): Promise<void> {
  for (const part of chunks(rows)) {
    await trx.raw(
      `update patients as p
          set derived_best_overall_response = v.bor, derived_responder = v.responder, derivation = v.derivation, outcome_flag = v.flag
         from (values ${part.map(() => '(?::uuid, ?::text, ?::boolean, ?::jsonb, ?::text)').join(', ')}) as v(id, bor, responder, derivation, flag)
        where p.id = v.id`,
      part.flatMap((r) => [r.patientId, r.derivedBestOverallResponse, r.derivedResponder, JSON.stringify(r.derivation), r.outcomeFlag]),
    );
  }
}

export type OutcomeColumns = { outcome: Outcome; bestOverallResponse: BestOverallResponse | null; responseAssessedOn: string | null };

/** Outcomes written by the derivation; each bumps the version and, like any other change to an outcome, clears its attestation. */
export async function storeDerivedOutcomes(trx: Knex.Transaction, rows: Array<OutcomeColumns & { patientId: string }>): Promise<void> {
  for (const part of chunks(rows)) {
    await trx.raw(
      `update patients as p
          set outcome = v.outcome, best_overall_response = v.bor, response_assessed_on = v.assessed_on,
              attestation_signature_id = null, version = p.version + 1, updated_at = now()
         from (values ${part.map(() => '(?::uuid, ?::text, ?::text, ?::date)').join(', ')}) as v(id, outcome, bor, assessed_on)
        where p.id = v.id`,
      part.flatMap((r) => [r.patientId, r.outcome, r.bestOverallResponse, r.responseAssessedOn]),
    );
  }
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
    .andWhere((w) => {
      w.whereNotNull('p.outcome_flag')
        .orWhereRaw("jsonb_array_length(coalesce(p.derivation->'attention', '[]'::jsonb)) > 0")
        .orWhereRaw("jsonb_array_length(coalesce(p.derivation->'pendingConfirmation', '[]'::jsonb)) > 0");
    })
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

