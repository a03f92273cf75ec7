/** The Design studio's reads and writes: cohorts, their design versions with signatures, enrolment counts. */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { isUuid } from '../auth/access.js';
import { toSignature, type Signature } from '../signatures/signatures.js';
import { assignStages, type AnalysisPopulation, type Outcome } from '../evaluation/counting.js';
import { toLockedDesign, type DesignRow, type LockedDesign } from './current-design.js';
import { toCohort as toTrialCohort, type Cohort, type CohortRow } from '../trials/trials.repository.js';

type Conn = Db | Knex.Transaction;

/** A cohort as the Design studio shows it: the trial's cohort record and the trial it belongs to. */
export type DesignCohort = Cohort & { trialId: string };

const toCohort = (row: CohortRow): DesignCohort => ({ ...toTrialCohort(row), trialId: row.trial_id });

export type SignedBy = Signature & { signerName: string | null };
export type DesignVersion = LockedDesign & { signature: SignedBy | null };

export async function findTrialCode(db: Conn, trialId: string): Promise<string | undefined> {
  const row = await db('trials').where({ id: trialId }).first('code');
  return row?.code;
}

/** The cohort of this trial; with `lock`, its row stays locked until the transaction ends. */
export async function findCohort(db: Conn, trialId: string, cohortId: string, options: { lock?: boolean } = {}): Promise<DesignCohort | undefined> {
  if (!isUuid(cohortId)) return undefined;
  const query = db('cohorts').where({ id: cohortId, trial_id: trialId }).first();
  const row: CohortRow | undefined = await (options.lock ? query.forUpdate() : query);
  return row && toCohort(row);
}

export async function listCohorts(db: Conn, trialId: string): Promise<DesignCohort[]> {
  const rows: CohortRow[] = await db('cohorts').where({ trial_id: trialId }).orderBy('position');
  return rows.map(toCohort);
}

export async function countEnrolled(db: Conn, cohortIds: string[]): Promise<Map<string, number>> {
  if (cohortIds.length === 0) return new Map();
  const rows: Array<{ cohort_id: string; count: string }> = await db('patients')
    .whereIn('cohort_id', cohortIds)
    .groupBy('cohort_id')
    .select('cohort_id')
    .count({ count: '*' });
  return new Map(rows.map((row) => [row.cohort_id, Number(row.count)]));
}

/** Every design version of the cohorts, newest first within each cohort, with its signature and signer. */
export async function listDesignVersions(db: Conn, cohortIds: string[]): Promise<DesignVersion[]> {
  if (cohortIds.length === 0) return [];
  const rows: DesignRow[] = await db('design_versions')
    .whereIn('cohort_id', cohortIds)
    .orderBy([{ column: 'cohort_id' }, { column: 'version', order: 'desc' }]);
  const signatureIds = rows.map((row) => row.signature_id).filter((id): id is string => !!id);
  const signatures = signatureIds.length
    ? await db('signatures as s').leftJoin('users as u', 'u.id', 's.signer_user_id').whereIn('s.id', signatureIds).select('s.*', 'u.name as signer_name')
    : [];
  const byId = new Map<string, SignedBy>(signatures.map((row) => [row.id, { ...toSignature(row), signerName: row.signer_name ?? null }]));
  return rows.map((row) => ({ ...toLockedDesign(row), signature: row.signature_id ? (byId.get(row.signature_id) ?? null) : null }));
}

export type NewDesignVersion = Omit<LockedDesign, 'createdAt'>;

export async function insertDesignVersion(trx: Knex.Transaction, design: NewDesignVersion): Promise<LockedDesign> {
  const [row]: DesignRow[] = await trx('design_versions')
    .insert({
      id: design.id,
      cohort_id: design.cohortId,
      version: design.version,
      selection: design.selection,
      p0: design.p0,
      p1: design.p1,
      alpha: design.alpha,
      beta: design.beta,
      nmax: design.nmax,
      r1: design.r1,
      n1: design.n1,
      r: design.r,
      n: design.n,
      en0: design.en0,
      pet0: design.pet0,
      type_i_error: design.typeIError,
      power: design.power,
      analysis_population: design.analysisPopulation,
      interim_accrual: design.interimAccrual,
      sponsor_sees_response: design.sponsorSeesResponse,
      protocol_reference: design.protocolReference,
      amendment_reason: design.amendmentReason,
      signature_id: design.signatureId,
      created_by: design.createdBy,
    })
    .returning('*');
  return toLockedDesign(row);
}

/** Stage 1 is the first n1 counting patients: a design with another n1 or population moves the boundary. */
export async function restagePatients(trx: Knex.Transaction, cohortId: string, n1: number | null, population: AnalysisPopulation): Promise<void> {
  const rows: Array<{ id: string; enrolment_seq: number; outcome: Outcome; evaluable: boolean; stage: number }> = await trx('patients')
    .where({ cohort_id: cohortId })
    .select('id', 'enrolment_seq', 'outcome', 'evaluable', 'stage');
  const stages = assignStages(
    rows.map((row) => ({ id: row.id, enrolmentSeq: row.enrolment_seq, outcome: row.outcome, evaluable: row.evaluable })),
    n1,
    population,
  );
  for (const row of rows) {
    const stage = stages.get(row.id);
    if (stage && stage !== row.stage) await trx('patients').where({ id: row.id }).update({ stage });
  }
}
