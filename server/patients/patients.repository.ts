/**
 * Patients in PostgreSQL: the only module of the feature that speaks Knex. Reads return camelCase
 * domain objects with the site, cohort and attestation joined in; filtering, sorting and paging of
 * the list happen in SQL so a trial of thousands of patients pages quickly.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { CountablePatient } from '../evaluation/counting.js';
import type { CohortStatus } from '../trials/trials.repository.js';
import type { BestOverallResponse, ListQuery, Outcome } from './patients.schema.js';

type Conn = Db | Knex.Transaction;
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
        ? { signatureId: row.attestation_signature_id, signerEmail: row.signer_email ?? '', signerName: row.signer_name, signedAt: row.signed_at.toISOString() }
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
  return db('patients as p')
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

export async function listPatients(
  db: Db,
  trialId: string,
  scope: SiteScope,
  query: ListQuery,
): Promise<{ patients: Patient[]; total: number; counts: OutcomeCounts }> {
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
  const byId = new Map(((ids.length > 0 ? await baseQuery(db).whereIn('p.id', ids).select(COLUMNS) : []) as PatientRow[]).map((row) => [row.id, row]));
  const rows = ids.map((id) => byId.get(id)).filter((row): row is PatientRow => row !== undefined);
  return { patients: rows.map(toPatient), total, counts };
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

/** The trial's code alone, for writes that only name the trial. */
export async function trialCode(db: Conn, trialId: string): Promise<string | undefined> {
  const trial = await db('trials').where({ id: trialId }).first('code');
  return trial?.code;
}

export type TrialSite = { id: string; code: string; name: string };
export type TrialCohort = { id: string; code: string; name: string; status: CohortStatus; position: number };
export type TrialFacts = { id: string; code: string; startDate: string | null; sites: TrialSite[]; cohorts: TrialCohort[] };

export async function trialFacts(db: Conn, trialId: string): Promise<TrialFacts | undefined> {
  const trial = await db('trials').where({ id: trialId }).first('id', 'code', 'start_date');
  if (!trial) return undefined;
  const sites: TrialSite[] = await db('trial_sites as ts').join('sites as s', 's.id', 'ts.site_id').where('ts.trial_id', trialId).orderBy('s.code').select('s.id', 's.code', 's.name');
  const cohorts: TrialCohort[] = await db('cohorts').where({ trial_id: trialId }).orderBy('position').select('id', 'code', 'name', 'status', 'position');
  return { id: trial.id, code: trial.code, startDate: trial.start_date, sites, cohorts };
}

/** Locks the cohort row so enrolments into it are numbered one at a time. */
export async function lockCohort(trx: Knex.Transaction, cohortId: string): Promise<TrialCohort> {
  return trx('cohorts').where({ id: cohortId }).forUpdate().first('id', 'code', 'name', 'status', 'position');
}

export async function nextEnrolmentSeq(trx: Knex.Transaction, cohortId: string): Promise<number> {
  const [{ max }] = await trx('patients').where({ cohort_id: cohortId }).max({ max: 'enrolment_seq' });
  return Number(max ?? 0) + 1;
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

/** How a cohort is counted: its population, n1 (null for one stage) and n (null without a locked design). */
export type CountingRule = { cohortId: string; population: 'all_enrolled' | 'evaluable'; n1: number | null; n: number | null };

/**
 * Patients grouped by what the counting rules look at: whether they count, their effective outcome,
 * evaluability, stage (first n1 counting patients in enrolment order) and whether they are among
 * the first n counting patients. A few rows per cohort instead of every patient.
 */
export type CountingGroup = {
  cohortId: string;
  stage: 1 | 2;
  counts: boolean;
  outcome: Outcome;
  evaluable: boolean;
  withinN: boolean;
  patients: number;
};

/** A point of the responders path: the k-th decided counting patient and the responders so far. */
export type PathPoint = { cohortId: string; evaluable: number; responders: number };

const RULES_SQL = 'select * from unnest(?::uuid[], ?::boolean[], ?::int[], ?::int[]) as r(cohort_id, evaluable_only, n1, n)';
// The pg driver sends JS arrays (nulls included) as PostgreSQL arrays.
const rulesBindings = (rules: CountingRule[]) =>
  [rules.map((r) => r.cohortId), rules.map((r) => r.population === 'evaluable'), rules.map((r) => r.n1), rules.map((r) => r.n)] as Knex.RawBinding[];

// The effective outcome: under "all enrolled" a patient who is not evaluable counts as a non-responder.
const COUNTED_PATIENTS = `select p.cohort_id, p.enrolment_seq, p.evaluable, r.n1, r.n,
    (not r.evaluable_only or p.evaluable) as counts,
    case when not r.evaluable_only and not p.evaluable then 'non_responder' else p.outcome end as outcome
  from patients p join rules r on r.cohort_id = p.cohort_id`;

export async function countingGroups(db: Conn, rules: CountingRule[]): Promise<CountingGroup[]> {
  if (rules.length === 0) return [];
  const { rows } = await db.raw(
    `with rules as (${RULES_SQL}),
     counted as (${COUNTED_PATIENTS}),
     ranked as (
       select *, count(*) filter (where counts) over (partition by cohort_id order by enrolment_seq rows between unbounded preceding and 1 preceding) as before
       from counted
     )
     select cohort_id, (n1 is null or before < n1) as stage1, counts, outcome, evaluable, (counts and n is not null and before < n) as within_n, count(*)::int as patients
     from ranked group by 1, 2, 3, 4, 5, 6`,
    rulesBindings(rules),
  );
  return (rows as Array<{ cohort_id: string; stage1: boolean; counts: boolean; outcome: Outcome; evaluable: boolean; within_n: boolean; patients: number }>).map((r) => ({
    cohortId: r.cohort_id,
    stage: r.stage1 ? 1 : 2,
    counts: r.counts,
    outcome: r.outcome,
    evaluable: r.evaluable,
    withinN: r.within_n,
    patients: r.patients,
  }));
}

/**
 * The responders path of each cohort (decided counting patients in enrolment order), thinned to
 * about `maxPoints` evenly spaced points; the first and the last point are always exact.
 */
export async function responderPaths(db: Conn, rules: CountingRule[], maxPoints: number): Promise<PathPoint[]> {
  if (rules.length === 0) return [];
  const { rows } = await db.raw(
    `with rules as (${RULES_SQL}),
     counted as (${COUNTED_PATIENTS}),
     decided as (
       select cohort_id, row_number() over w as k, count(*) filter (where outcome = 'responder') over w as responders, count(*) over (partition by cohort_id) as total
       from counted where counts and outcome <> 'pending'
       window w as (partition by cohort_id order by enrolment_seq rows between unbounded preceding and current row)
     )
     select cohort_id, k::int as evaluable, responders::int as responders from decided
     where k = 1 or k = total or k % ceil(total / ?::numeric)::int = 0
     order by cohort_id, k`,
    [...rulesBindings(rules), maxPoints],
  );
  return (rows as Array<{ cohort_id: string; evaluable: number; responders: number }>).map((r) => ({ cohortId: r.cohort_id, evaluable: r.evaluable, responders: r.responders }));
}

/** Patients of the cohort that count under the population (every one, or the evaluable ones). */
export async function countCounting(db: Conn, cohortId: string, population: 'all_enrolled' | 'evaluable'): Promise<number> {
  const query = db('patients').where({ cohort_id: cohortId });
  if (population === 'evaluable') query.where({ evaluable: true });
  const [{ count }] = await query.count({ count: '*' });
  return Number(count);
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

export async function insertPatient(trx: Knex.Transaction, p: NewPatient): Promise<string> {
  const [row] = await trx('patients')
    .insert({
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
    })
    .returning('id');
  return row.id;
}

export type OutcomeFields = {
  outcome: Outcome;
  bestOverallResponse: BestOverallResponse | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  notEvaluableReason: string | null;
};

/** Writes the outcome only if the version still matches; returns false when someone else wrote first. */
export async function updateOutcome(
  trx: Knex.Transaction,
  patientId: string,
  version: number,
  fields: OutcomeFields,
  options: { clearAttestation: boolean },
): Promise<boolean> {
  const updated = await trx('patients')
    .where({ id: patientId, version })
    .update({
      outcome: fields.outcome,
      best_overall_response: fields.bestOverallResponse,
      response_assessed_on: fields.responseAssessedOn,
      evaluable: fields.evaluable,
      not_evaluable_reason: fields.notEvaluableReason,
      ...(options.clearAttestation ? { attestation_signature_id: null } : {}),
      version: version + 1,
      updated_at: trx.fn.now(),
    });
  return updated === 1;
}

export async function setAttestation(trx: Knex.Transaction, patientId: string, version: number, signatureId: string): Promise<boolean> {
  const updated = await trx('patients')
    .where({ id: patientId, version })
    .update({ attestation_signature_id: signatureId, version: version + 1, updated_at: trx.fn.now() });
  return updated === 1;
}

export type HistoryEntry = {
  id: number;
  at: string;
  action: string;
  actor: { id: string | null; email: string | null; name: string | null };
  before: unknown;
  after: unknown;
  reason: string | null;
};

export async function patientHistory(db: Db, patientId: string): Promise<HistoryEntry[]> {
  const rows: Array<{ id: number; at: Date; action: string; actor_user_id: string | null; email: string | null; name: string | null; before: unknown; after: unknown; reason: string | null }> =
    await db('audit_log as a')
      .leftJoin('users as u', 'u.id', 'a.actor_user_id')
      .where({ 'a.entity_type': 'patient', 'a.entity_id': patientId })
      .orderBy('a.id', 'asc')
      .select('a.id', 'a.at', 'a.action', 'a.actor_user_id', 'u.email', 'u.name', 'a.before', 'a.after', 'a.reason');
  return rows.map((r) => ({
    id: r.id,
    at: r.at.toISOString(),
    action: r.action,
    actor: { id: r.actor_user_id, email: r.email, name: r.name },
    before: r.before,
    after: r.after,
    reason: r.reason,
  }));
}

/** E-mail addresses of the trial's active members in the given roles. */
export async function memberEmails(db: Conn, trialId: string, roles: string[]): Promise<string[]> {
  const rows: Array<{ email: string }> = await db('memberships')
    .where({ trial_id: trialId, status: 'active' })
    .whereIn('role', roles)
    .distinct(db.raw('lower(email) as email'));
  return rows.map((r) => r.email).sort();
}
