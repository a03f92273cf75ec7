/**
 * The data cuts store: one row per cut with its frozen trial and designs (the snapshot), its
 * content hash, counts and release, read back as plain domain objects together with the cut's
 * current analysis version (its prior) and latest report. The analysis versions, the reports, the
 * frozen patients, the recommendations and the applied decisions have their own stores beside
 * this one.
 */
import type { Knex } from 'knex';
import { preparedStatement, readPrepared, type Db } from '../db/knex.js';
import { VersionedCache } from '../db/trial-versions.js';
import type { LockedDesign } from '../designs/index.js';
import type { CohortStatus } from '../trials/index.js';
import type { CutKind } from './data-cuts.schema.js';

type Conn = Db | Knex.Transaction;

// Kept for the client and the tests, which import these names from here.
export type { CutAssessment, CutPatient } from './cut-patients.repository.js';
export type { Recommendation } from './recommendations.repository.js';
export type { AppliedDecision } from './decisions.repository.js';

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
> &
  /** The safety rule the design locked; absent in cuts frozen before safety monitoring existed. */
  Partial<Pick<LockedDesign, 'safetyRule' | 'toxicity' | 'boundary' | 'bryantDay'>>;

export type CutCohort = { id: string; code: string; name: string; status: CohortStatus; design: CutDesign | null };

/** What the cut froze besides the patients: the trial and each cohort with its design. */
export type CutSnapshot = {
  trial: { id: string; code: string; title: string; indication: string; sponsorName: string | null };
  cohorts: CutCohort[];
  /** The cut froze the adverse events of its patients (cuts frozen before safety monitoring did not). */
  adverseEventsFrozen?: boolean;
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
  /** SHA-256 of the latest report issued (null until the report is first downloaded). */
  reportHash: string | null;
  /** The prior of the current analysis version. */
  prior: { a: number | null; b: number | null; thetaT: number };
  releasedToSponsorAt: string | null;
  /** The current analysis version's number: a change of prior starts the next one. */
  version: number;
  /** The current analysis version's id (what a recommendation signed now points at). */
  analysisVersionId: string;
  createdAt: string;
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
  released_to_sponsor_at: Date | null;
  created_at: Date;
  /** From the current analysis version and the latest report (see `withCurrentVersion`). */
  analysis_version_id: string;
  analysis_version: number;
  prior_a: number | null;
  prior_b: number | null;
  theta_t: number;
  report_hash: string | null;
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
    version: row.analysis_version,
    analysisVersionId: row.analysis_version_id,
    createdAt: row.created_at.toISOString(),
  };
}

/** The cut's row with its current analysis version and the hash of its latest report. */
function withCurrentVersion(conn: Conn, alias = 'd') {
  return conn(`data_cuts as ${alias}`)
    .joinRaw(
      `join lateral (select id as analysis_version_id, version as analysis_version, prior_a, prior_b, theta_t
                       from analysis_versions v where v.data_cut_id = ${alias}.id order by v.version desc limit 1) av on true`,
    )
    .joinRaw(`left join lateral (select sha256 as report_hash from data_cut_reports r where r.data_cut_id = ${alias}.id order by r.seq desc limit 1) rep on true`)
    .select(`${alias}.*`, 'av.*', 'rep.report_hash');
}

export async function nextSeq(trx: Knex.Transaction, trialId: string): Promise<number> {
  const row = await trx('data_cuts').where({ trial_id: trialId }).max({ seq: 'seq' }).first();
  return Number(row?.seq ?? 0) + 1;
}

/** Inserts the cut; the database gives it analysis version 1 (the stated default prior, Beta(p0, 1 − p0) per cohort, θT 0.9). */
export async function insertDataCut(
  trx: Knex.Transaction,
  cut: Omit<DataCut, 'id' | 'reportHash' | 'prior' | 'releasedToSponsorAt' | 'version' | 'analysisVersionId' | 'createdAt'>,
): Promise<DataCut> {
  const [inserted] = await trx('data_cuts')
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
    .returning('id');
  return (await findDataCut(trx, inserted.id)) as DataCut;
}

/** An analysis version: append-only; the highest number is the cut's current analysis. */
export async function insertAnalysisVersion(
  trx: Knex.Transaction,
  input: { dataCutId: string; version: number; prior: DataCut['prior']; createdBy: string | null },
): Promise<void> {
  await trx('analysis_versions').insert({
    data_cut_id: input.dataCutId,
    version: input.version,
    prior_a: input.prior.a,
    prior_b: input.prior.b,
    theta_t: input.prior.thetaT,
    created_by: input.createdBy,
  });
}

const dataCutRow = preparedStatement('orrery_find_data_cut', (db, cutId: string) => withCurrentVersion(db).where('d.id', cutId).limit(1));

export async function findDataCut(conn: Conn, cutId: string, options: { forUpdate?: boolean } = {}): Promise<DataCut | undefined> {
  let row: DataCutRow | undefined;
  if (options.forUpdate) row = await withCurrentVersion(conn).where('d.id', cutId).forUpdate('d').first();
  // Outside a transaction (the cut's pages, read often), a named statement.
  else if (!(conn as Knex.Transaction).isTransaction) [row] = await readPrepared<DataCutRow>(conn as Db, dataCutRow(conn as Db, cutId));
  else row = await withCurrentVersion(conn).where('d.id', cutId).first();
  return row ? toDataCut(row) : undefined;
}

// A cut's trial never changes and a cut is never deleted (the data_cuts_frozen trigger): once read, it is known for good (one version, 0).
const trialOfCutCache = new VersionedCache<string>(10_000);

/** The trial a cut belongs to (every cut route's access check asks it first). */
export async function trialOfCut(db: Db, cutId: string): Promise<string | undefined> {
  const known = trialOfCutCache.get(cutId, 0);
  if (known) return known;
  const row: { trial_id: string } | undefined = await db('data_cuts').where({ id: cutId }).first('trial_id');
  if (row) trialOfCutCache.set(cutId, 0, row.trial_id);
  return row?.trial_id;
}

export type DataCutListItem = DataCut & { recommendationCount: number; decisionCount: number; createdByName: string | null };

export async function listDataCuts(conn: Conn, trialId: string): Promise<DataCutListItem[]> {
  const rows: Array<DataCutRow & { recommendation_count: number; decision_count: number; created_by_name: string | null }> = await withCurrentVersion(conn)
    .leftJoin('users as u', 'u.id', 'd.created_by')
    .where({ 'd.trial_id': trialId })
    .orderBy('d.seq', 'desc')
    .select(
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

export async function releaseToSponsor(trx: Knex.Transaction, cutId: string): Promise<void> {
  await trx('data_cuts').where({ id: cutId }).whereNull('released_to_sponsor_at').update({ released_to_sponsor_at: trx.fn.now() });
}
