/** The design in force for a cohort: its latest locked version. */
import type { Db } from '../db/knex.js';
import type { Knex } from 'knex';

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

export async function currentDesigns(db: Db | Knex.Transaction, cohortIds: string[]): Promise<Map<string, LockedDesign>> {
  if (cohortIds.length === 0) return new Map();
  const rows: DesignRow[] = await db('design_versions')
    .whereIn('cohort_id', cohortIds)
    .distinctOn('cohort_id')
    .orderBy([{ column: 'cohort_id' }, { column: 'version', order: 'desc' }]);
  return new Map(rows.map((row) => [row.cohort_id, toLockedDesign(row)]));
}

export async function currentDesign(db: Db | Knex.Transaction, cohortId: string): Promise<LockedDesign | undefined> {
  return (await currentDesigns(db, [cohortId])).get(cohortId);
}
