/**
 * The design versions store: every signed version of a cohort's design, the one in force (the
 * latest) and the signature behind each. The only module that reads or writes design_versions.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { toSignature, type Signature } from '../signatures/signatures.js';

type Conn = Db | Knex.Transaction;

export type LockedDesign = {
  id: string;
  cohortId: string;
  version: number;
  selection: 'single_stage' | 'optimal' | 'minimax' | 'admissible';
  p0: number;
  p1: number;
  alpha: number;
  beta: number;
  nmax: number | null;
  /** Absent for a single-stage design. */
  r1: number | null;
  n1: number | null;
  r: number;
  n: number;
  en0: number | null;
  pet0: number | null;
  typeIError: number;
  power: number;
  analysisPopulation: 'all_enrolled' | 'evaluable';
  interimAccrual: 'pause' | 'continue_at_risk';
  sponsorSeesResponse: boolean;
  protocolReference: string | null;
  amendmentReason: string | null;
  signatureId: string | null;
  createdBy: string | null;
  createdAt: string;
};

export type DesignRow = {
  id: string;
  cohort_id: string;
  version: number;
  selection: LockedDesign['selection'];
  p0: number;
  p1: number;
  alpha: number;
  beta: number;
  nmax: number | null;
  r1: number | null;
  n1: number | null;
  r: number;
  n: number;
  en0: number | null;
  pet0: number | null;
  type_i_error: number;
  power: number;
  analysis_population: LockedDesign['analysisPopulation'];
  interim_accrual: LockedDesign['interimAccrual'];
  sponsor_sees_response: boolean;
  protocol_reference: string | null;
  amendment_reason: string | null;
  signature_id: string | null;
  created_by: string | null;
  created_at: Date;
};

export function toLockedDesign(row: DesignRow): LockedDesign {
  return {
    id: row.id,
    cohortId: row.cohort_id,
    version: row.version,
    selection: row.selection,
    p0: Number(row.p0),
    p1: Number(row.p1),
    alpha: Number(row.alpha),
    beta: Number(row.beta),
    nmax: row.nmax,
    r1: row.r1,
    n1: row.n1,
    r: row.r,
    n: row.n,
    en0: row.en0,
    pet0: row.pet0,
    typeIError: row.type_i_error,
    power: row.power,
    analysisPopulation: row.analysis_population,
    interimAccrual: row.interim_accrual,
    sponsorSeesResponse: row.sponsor_sees_response,
    protocolReference: row.protocol_reference,
    amendmentReason: row.amendment_reason,
    signatureId: row.signature_id,
    createdBy: row.created_by,
    createdAt: row.created_at.toISOString(),
  };
}

export async function currentDesigns(db: Conn, cohortIds: string[]): Promise<Map<string, LockedDesign>> {
  if (cohortIds.length === 0) return new Map();
  const rows: DesignRow[] = await db('design_versions')
    .whereIn('cohort_id', cohortIds)
    .distinctOn('cohort_id')
    .orderBy([{ column: 'cohort_id' }, { column: 'version', order: 'desc' }]);
  return new Map(rows.map((row) => [row.cohort_id, toLockedDesign(row)]));
}

export async function currentDesign(db: Conn, cohortId: string): Promise<LockedDesign | undefined> {
  return (await currentDesigns(db, [cohortId])).get(cohortId);
}

export type SignedBy = Signature;
export type DesignVersion = LockedDesign & { signature: SignedBy | null };

/** Every design version of the cohorts, newest first within each cohort, with its signature and signer. */
export async function listDesignVersions(db: Conn, cohortIds: string[]): Promise<DesignVersion[]> {
  if (cohortIds.length === 0) return [];
  const rows: DesignRow[] = await db('design_versions')
    .whereIn('cohort_id', cohortIds)
    .orderBy([{ column: 'cohort_id' }, { column: 'version', order: 'desc' }]);
  const signatureIds = rows.map((row) => row.signature_id).filter((id): id is string => !!id);
  const signatures = signatureIds.length
    ? await db('signatures as s').leftJoin('users as u', 'u.id', 's.signer_user_id').whereIn('s.id', signatureIds).select('s.*', 'u.name as user_name')
    : [];
  // The printed name as it was at signing; signatures older than that column fall back to the person's name now.
  const byId = new Map<string, SignedBy>(signatures.map((row) => [row.id, { ...toSignature(row), signerName: row.signer_name ?? row.user_name ?? null }]));
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
