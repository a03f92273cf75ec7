/**
 * The only place data cuts touch the database: reading the live patients of a cut's scope, writing
 * the frozen copy, and reading cuts, their patients, recommendations and decisions back as plain
 * domain objects.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { LockedDesign } from '../design-studio/current-design.js';
import type { Outcome } from '../evaluation/counting.js';
import { toSignature, type Signature } from '../signatures/signatures.js';
import type { CohortStatus } from '../trials/trials.repository.js';
import type { CutKind, DecisionAction, RecommendationDecision } from './data-cuts.schema.js';

type Conn = Db | Knex.Transaction;

export type CutAssessment = { assessedOn: string; response: string; notes: string | null };

/** One patient as the cut saw them. */
export type CutPatient = {
  patientId: string;
  studyId: string;
  siteId: string;
  siteCode: string;
  cohortId: string;
  cohortCode: string;
  stage: number;
  enrolmentSeq: number;
  enrolledOn: string;
  outcome: Outcome;
  bestOverallResponse: string | null;
  responseAssessedOn: string | null;
  evaluable: boolean;
  notEvaluableReason: string | null;
  attested: boolean;
  attestationSignatureId: string | null;
  derivedBestOverallResponse: string | null;
  derivedResponder: boolean | null;
  outcomeFlag: string | null;
  patientVersion: number;
  assessments: CutAssessment[];
};

/** The design of a cohort as it stood at the cut: the locked design's numbers and rules, without its signing details. */
export type CutDesign = Pick<
  LockedDesign,
  | 'id'
  | 'version'
  | 'selection'
  | 'p0'
  | 'p1'
  | 'alpha'
  | 'beta'
  | 'nmax'
  | 'r1'
  | 'n1'
  | 'r'
  | 'n'
  | 'en0'
  | 'pet0'
  | 'typeIError'
  | 'power'
  | 'analysisPopulation'
  | 'interimAccrual'
  | 'sponsorSeesResponse'
  | 'protocolReference'
>;

export type CutCohort = { id: string; code: string; name: string; status: CohortStatus; design: CutDesign | null };

/** What the cut froze besides the patients: the trial and each cohort with its design. */
export type CutSnapshot = {
  trial: { id: string; code: string; title: string; indication: string; sponsorName: string | null };
  cohorts: CutCohort[];
};

export type CutCounts = { patients: number; pending: number; unattested: number; flagged: number; notEvaluable: number };

export type DataCut = {
  id: string;
  trialId: string;
  cohortId: string | null;
  seq: number;
  kind: CutKind;
  designVersionId: string | null;
  snapshot: CutSnapshot;
  cutAt: string;
  createdBy: string | null;
  contentHash: string;
  counts: CutCounts;
  reportHash: string | null;
  prior: { a: number | null; b: number | null; thetaT: number };
  releasedToSponsorAt: string | null;
  version: number;
  createdAt: string;
};

export type Recommendation = {
  id: string;
  dataCutId: string;
  memberUserId: string;
  memberName: string | null;
  memberEmail: string;
  decision: RecommendationDecision;
  rationale: string;
  signature: Signature;
  createdAt: string;
};

export type AppliedDecision = {
  id: string;
  dataCutId: string;
  cohortId: string;
  cohortCode: string;
  action: DecisionAction;
  fromStatus: CohortStatus;
  toStatus: CohortStatus;
  stopCategory: string | null;
  reason: string;
  appliedBy: string | null;
  appliedByName: string | null;
  appliedAt: string;
};

type DataCutRow = {
  id: string;
  trial_id: string;
  cohort_id: string | null;
  seq: number;
  kind: CutKind;
  design_version_id: string | null;
  snapshot: CutSnapshot;
  cut_at: Date;
  created_by: string | null;
  content_hash: string;
  patient_count: number;
  pending_count: number;
  unattested_count: number;
  flagged_count: number;
  not_evaluable_count: number;
  report_hash: string | null;
  prior_a: number | null;
  prior_b: number | null;
  theta_t: number;
  released_to_sponsor_at: Date | null;
  version: number;
  created_at: Date;
};

type CutPatientRow = {
  data_cut_id?: string;
  patient_id: string;
  study_id: string;
  site_id: string;
  site_code: string;
  cohort_id: string;
  cohort_code: string;
  stage: number;
  enrolment_seq: number;
  enrolled_on: string;
  outcome: Outcome;
  best_overall_response: string | null;
  response_assessed_on: string | null;
  evaluable: boolean;
  not_evaluable_reason: string | null;
  attested: boolean;
  attestation_signature_id: string | null;
  derived_best_overall_response: string | null;
  derived_responder: boolean | null;
  outcome_flag: string | null;
  patient_version: number;
  assessments: CutAssessment[];
};

function toDataCut(row: DataCutRow): DataCut {
  return {
    id: row.id,
    trialId: row.trial_id,
    cohortId: row.cohort_id,
    seq: row.seq,
    kind: row.kind,
    designVersionId: row.design_version_id,
    snapshot: row.snapshot,
    cutAt: row.cut_at.toISOString(),
    createdBy: row.created_by,
    contentHash: row.content_hash,
    counts: {
      patients: row.patient_count,
      pending: row.pending_count,
      unattested: row.unattested_count,
      flagged: row.flagged_count,
      notEvaluable: row.not_evaluable_count,
    },
    reportHash: row.report_hash,
    prior: { a: row.prior_a, b: row.prior_b, thetaT: row.theta_t },
    releasedToSponsorAt: row.released_to_sponsor_at?.toISOString() ?? null,
    version: row.version,
    createdAt: row.created_at.toISOString(),
  };
}

function toCutPatient(row: CutPatientRow): CutPatient {
  return {
    patientId: row.patient_id,
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
    attested: row.attested,
    attestationSignatureId: row.attestation_signature_id,
    derivedBestOverallResponse: row.derived_best_overall_response,
    derivedResponder: row.derived_responder,
    outcomeFlag: row.outcome_flag,
    patientVersion: row.patient_version,
    assessments: row.assessments ?? [],
  };
}

const byCohortThenSeq = (a: CutPatient, b: CutPatient) =>
  a.cohortCode === b.cohortCode ? a.enrolmentSeq - b.enrolmentSeq : a.cohortCode < b.cohortCode ? -1 : 1;

/** The trial row, locked so two cuts of one trial are numbered one after the other. */
export async function lockTrial(trx: Knex.Transaction, trialId: string) {
  return trx('trials').where({ id: trialId }).forUpdate().first('id', 'code', 'title', 'indication', 'sponsor_name');
}

export async function readCohorts(conn: Conn, trialId: string): Promise<Array<{ id: string; code: string; name: string; status: CohortStatus }>> {
  return conn('cohorts').where({ trial_id: trialId }).orderBy('position').select('id', 'code', 'name', 'status');
}

export async function readCohortStatus(conn: Conn, cohortId: string): Promise<{ status: CohortStatus; code: string }> {
  return conn('cohorts').where({ id: cohortId }).first('status', 'code');
}

export async function nextSeq(trx: Knex.Transaction, trialId: string): Promise<number> {
  const row = await trx('data_cuts').where({ trial_id: trialId }).max({ seq: 'seq' }).first();
  return Number(row?.seq ?? 0) + 1;
}

/** Every live patient of the given cohorts with their assessments, in the shape the cut keeps. */
export async function readLivePatients(conn: Conn, cohortIds: string[]): Promise<CutPatient[]> {
  if (cohortIds.length === 0) return [];
  const rows: CutPatientRow[] = await conn('patients as p')
    .join('sites as s', 's.id', 'p.site_id')
    .join('cohorts as c', 'c.id', 'p.cohort_id')
    .whereIn('p.cohort_id', cohortIds)
    .select(
      'p.id as patient_id',
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
      conn.raw('(p.attestation_signature_id is not null) as attested'),
      'p.attestation_signature_id',
      'p.derived_best_overall_response',
      'p.derived_responder',
      'p.outcome_flag',
      'p.version as patient_version',
      conn.raw(`coalesce((select jsonb_agg(jsonb_build_object('assessedOn', a.assessed_on, 'response', a.response, 'notes', a.notes)
                                           order by a.assessed_on)
                            from assessments a where a.patient_id = p.id), '[]'::jsonb) as assessments`),
    );
  return rows.map(toCutPatient).sort(byCohortThenSeq);
}

export async function insertDataCut(
  trx: Knex.Transaction,
  cut: Omit<DataCut, 'id' | 'reportHash' | 'prior' | 'releasedToSponsorAt' | 'version' | 'createdAt'>,
  patients: CutPatient[],
): Promise<DataCut> {
  const [row] = await trx('data_cuts')
    .insert({
      trial_id: cut.trialId,
      cohort_id: cut.cohortId,
      seq: cut.seq,
      kind: cut.kind,
      design_version_id: cut.designVersionId,
      snapshot: JSON.stringify(cut.snapshot),
      cut_at: new Date(cut.cutAt),
      created_by: cut.createdBy,
      content_hash: cut.contentHash,
      patient_count: cut.counts.patients,
      pending_count: cut.counts.pending,
      unattested_count: cut.counts.unattested,
      flagged_count: cut.counts.flagged,
      not_evaluable_count: cut.counts.notEvaluable,
    })
    .returning('*');
  const copies = patients.map((p) => ({
    data_cut_id: row.id,
    patient_id: p.patientId,
    study_id: p.studyId,
    site_id: p.siteId,
    site_code: p.siteCode,
    cohort_id: p.cohortId,
    cohort_code: p.cohortCode,
    stage: p.stage,
    enrolment_seq: p.enrolmentSeq,
    enrolled_on: p.enrolledOn,
    outcome: p.outcome,
    best_overall_response: p.bestOverallResponse,
    response_assessed_on: p.responseAssessedOn,
    evaluable: p.evaluable,
    not_evaluable_reason: p.notEvaluableReason,
    attested: p.attested,
    attestation_signature_id: p.attestationSignatureId,
    derived_best_overall_response: p.derivedBestOverallResponse,
    derived_responder: p.derivedResponder,
    outcome_flag: p.outcomeFlag,
    patient_version: p.patientVersion,
    assessments: JSON.stringify(p.assessments),
  }));
  // Batches keep each statement's parameter count well under PostgreSQL's limit.
  for (let i = 0; i < copies.length; i += 500) await trx('data_cut_patients').insert(copies.slice(i, i + 500));
  return toDataCut(row as DataCutRow);
}

export async function findDataCut(conn: Conn, cutId: string, options: { forUpdate?: boolean } = {}): Promise<DataCut | undefined> {
  const query = conn('data_cuts').where({ id: cutId });
  const row: DataCutRow | undefined = await (options.forUpdate ? query.forUpdate().first() : query.first());
  return row ? toDataCut(row) : undefined;
}

export async function trialOfCut(db: Db, cutId: string): Promise<string | undefined> {
  const row = await db('data_cuts').where({ id: cutId }).first('trial_id');
  return row?.trial_id;
}

export type DataCutListItem = DataCut & { recommendationCount: number; decisionCount: number; createdByName: string | null };

export async function listDataCuts(conn: Conn, trialId: string): Promise<DataCutListItem[]> {
  const rows: Array<DataCutRow & { recommendation_count: number; decision_count: number; created_by_name: string | null }> = await conn(
    'data_cuts as d',
  )
    .leftJoin('users as u', 'u.id', 'd.created_by')
    .where({ 'd.trial_id': trialId })
    .orderBy('d.seq', 'desc')
    .select(
      'd.*',
      'u.name as created_by_name',
      conn.raw('(select count(*) from recommendations r where r.data_cut_id = d.id)::int as recommendation_count'),
      conn.raw('(select count(*) from data_cut_decisions x where x.data_cut_id = d.id)::int as decision_count'),
    );
  return rows.map((row) => ({
    ...toDataCut(row),
    recommendationCount: row.recommendation_count,
    decisionCount: row.decision_count,
    createdByName: row.created_by_name,
  }));
}

export async function readCutPatients(conn: Conn, cutId: string): Promise<CutPatient[]> {
  const rows: CutPatientRow[] = await conn('data_cut_patients').where({ data_cut_id: cutId });
  return rows.map(toCutPatient).sort(byCohortThenSeq);
}

export async function updatePrior(
  trx: Knex.Transaction,
  cutId: string,
  expectedVersion: number,
  prior: { a: number | null; b: number | null; thetaT: number },
): Promise<DataCut | undefined> {
  const [row] = await trx('data_cuts')
    .where({ id: cutId, version: expectedVersion })
    .update({ prior_a: prior.a, prior_b: prior.b, theta_t: prior.thetaT, version: trx.raw('version + 1') })
    .returning('*');
  return row ? toDataCut(row as DataCutRow) : undefined;
}

export async function setReportHash(conn: Conn, cutId: string, hash: string): Promise<void> {
  await conn('data_cuts').where({ id: cutId }).whereRaw('report_hash is distinct from ?', [hash]).update({ report_hash: hash });
}

export async function releaseToSponsor(trx: Knex.Transaction, cutId: string): Promise<void> {
  await trx('data_cuts').where({ id: cutId }).whereNull('released_to_sponsor_at').update({ released_to_sponsor_at: trx.fn.now() });
}

export async function listRecommendations(conn: Conn, cutId: string): Promise<Recommendation[]> {
  const rows = await conn('recommendations as r')
    .join('signatures as s', 's.id', 'r.signature_id')
    .join('users as u', 'u.id', 'r.member_user_id')
    .where({ 'r.data_cut_id': cutId })
    .orderBy('r.created_at')
    .select(
      'r.*',
      'u.name as member_name',
      'u.email as member_email',
      conn.raw(`to_jsonb(s.*) as signature`),
    );
  return rows.map((row) => ({
    id: row.id,
    dataCutId: row.data_cut_id,
    memberUserId: row.member_user_id,
    memberName: row.member_name,
    memberEmail: row.member_email,
    decision: row.decision,
    rationale: row.rationale,
    signature: toSignature({
      ...row.signature,
      authenticated_at: new Date(row.signature.authenticated_at),
      signed_at: new Date(row.signature.signed_at),
    }),
    createdAt: (row.created_at as Date).toISOString(),
  }));
}

export async function findRecommendationBy(conn: Conn, cutId: string, userId: string): Promise<{ id: string } | undefined> {
  return conn('recommendations').where({ data_cut_id: cutId, member_user_id: userId }).first('id');
}

export async function insertRecommendation(
  trx: Knex.Transaction,
  input: { dataCutId: string; memberUserId: string; decision: RecommendationDecision; rationale: string; signatureId: string },
): Promise<string> {
  const [row] = await trx('recommendations')
    .insert({
      data_cut_id: input.dataCutId,
      member_user_id: input.memberUserId,
      decision: input.decision,
      rationale: input.rationale,
      signature_id: input.signatureId,
    })
    .returning('id');
  return row.id;
}

/** Committee members of the trial: how many could sign. */
export async function countMonitors(conn: Conn, trialId: string): Promise<number> {
  const row = await conn('memberships').where({ trial_id: trialId, role: 'monitor', status: 'active' }).countDistinct({ n: 'user_id' }).first();
  return Number(row?.n ?? 0);
}

export async function listDecisions(conn: Conn, cutId: string): Promise<AppliedDecision[]> {
  const rows = await conn('data_cut_decisions as d')
    .join('cohorts as c', 'c.id', 'd.cohort_id')
    .leftJoin('users as u', 'u.id', 'd.applied_by')
    .where({ 'd.data_cut_id': cutId })
    .orderBy('d.applied_at')
    .select('d.*', 'c.code as cohort_code', 'u.name as applied_by_name');
  return rows.map((row) => ({
    id: row.id,
    dataCutId: row.data_cut_id,
    cohortId: row.cohort_id,
    cohortCode: row.cohort_code,
    action: row.action,
    fromStatus: row.from_status,
    toStatus: row.to_status,
    stopCategory: row.stop_category,
    reason: row.reason,
    appliedBy: row.applied_by,
    appliedByName: row.applied_by_name,
    appliedAt: (row.applied_at as Date).toISOString(),
  }));
}

export async function insertDecision(
  trx: Knex.Transaction,
  input: Omit<AppliedDecision, 'id' | 'cohortCode' | 'appliedByName' | 'appliedAt'> & { appliedAt?: Date },
): Promise<string> {
  const [row] = await trx('data_cut_decisions')
    .insert({
      data_cut_id: input.dataCutId,
      cohort_id: input.cohortId,
      action: input.action,
      from_status: input.fromStatus,
      to_status: input.toStatus,
      stop_category: input.stopCategory,
      reason: input.reason,
      applied_by: input.appliedBy,
      ...(input.appliedAt ? { applied_at: input.appliedAt } : {}),
    })
    .returning('id');
  return row.id;
}

/** The trial's people who hear about an applied decision: site staff and sponsors. */
export async function decisionRecipients(conn: Conn, trialId: string): Promise<Array<{ email: string; role: string }>> {
  return conn('memberships')
    .where({ trial_id: trialId, status: 'active' })
    .whereIn('role', ['coordinator', 'investigator', 'sponsor'])
    .distinct('email', 'role')
    .orderBy(['email', 'role']);
}

export async function statisticianEmails(conn: Conn, trialId: string): Promise<string[]> {
  const rows: Array<{ email: string }> = await conn('memberships').where({ trial_id: trialId, role: 'statistician', status: 'active' }).distinct('email');
  return rows.map((row) => row.email);
}

export async function findUserName(conn: Conn, userId: string): Promise<string | null> {
  const row = await conn('users').where({ id: userId }).first('name', 'email');
  return row?.name ?? row?.email ?? null;
}
