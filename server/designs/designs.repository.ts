/**
 * The design versions store: every signed version of a cohort's design, the one in force (the
 * latest) and the signature behind each. The only module that reads or writes design_versions.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { toSignature, type Signature } from '../signatures/signatures.js';
import type { SafetyRule } from '../safety/index.js';

type Conn = Db | Knex.Transaction;

/** The protocol's toxicity definition: grade at or above minGrade, attribution possible or stronger, onset within windowDays of enrolment. */
export type ToxicityDefinition = { minGrade: number; windowDays: number };
/** The continuous toxicity boundary over the design's n patients. */
export type LockedBoundary = { theta: number; alpha: number; bounds: Array<number | null>; nominalLevel: number; crossingProbability: number };
/** A Bryant–Day design's toxicity part (its response part is r1/n1, r/n; α is αR). */
export type LockedBryantDay = {
  toxAcceptable: number;
  toxUnacceptable: number;
  alphaT: number;
  t1: number;
  t: number;
  attainedAlphaT: number;
  expectedNHighToxicity: number;
};
export type DesignSafety = { safetyRule: SafetyRule; toxicity: ToxicityDefinition | null; boundary: LockedBoundary | null; bryantDay: LockedBryantDay | null };

export type LockedDesign = DesignSafety & {
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
  safety_rule: SafetyRule;
  tox_min_grade: number | null;
  tox_window_days: number | null;
  tox_theta: number | null;
  tox_alpha: number | null;
  tox_bounds: Array<number | null> | null;
  tox_nominal_level: number | null;
  tox_crossing_probability: number | null;
  tox_acceptable: number | null;
  tox_unacceptable: number | null;
  alpha_t: number | null;
  t1: number | null;
  t: number | null;
  attained_alpha_t: number | null;
  en_high_toxicity: number | null;
};

function safetyOf(row: DesignRow): DesignSafety {
  return {
    safetyRule: row.safety_rule,
    toxicity: row.tox_min_grade !== null && row.tox_window_days !== null ? { minGrade: row.tox_min_grade, windowDays: row.tox_window_days } : null,
    boundary:
      row.safety_rule === 'toxicity_boundary' && row.tox_bounds && row.tox_theta !== null && row.tox_alpha !== null
        ? {
            theta: row.tox_theta,
            alpha: row.tox_alpha,
            bounds: row.tox_bounds,
            nominalLevel: row.tox_nominal_level ?? 0,
            crossingProbability: row.tox_crossing_probability ?? 0,
          }
        : null,
    bryantDay:
      row.safety_rule === 'bryant_day' && row.t1 !== null && row.t !== null
        ? {
            toxAcceptable: row.tox_acceptable ?? 0,
            toxUnacceptable: row.tox_unacceptable ?? 0,
            alphaT: row.alpha_t ?? 0,
            t1: row.t1,
            t: row.t,
            attainedAlphaT: row.attained_alpha_t ?? 0,
            expectedNHighToxicity: row.en_high_toxicity ?? 0,
          }
        : null,
  };
}

export function toLockedDesign(row: DesignRow): LockedDesign {
  return {
    ...safetyOf(row),
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
      safety_rule: design.safetyRule,
      tox_min_grade: design.toxicity?.minGrade ?? null,
      tox_window_days: design.toxicity?.windowDays ?? null,
      tox_theta: design.boundary?.theta ?? null,
      tox_alpha: design.boundary?.alpha ?? null,
      tox_bounds: design.boundary ? JSON.stringify(design.boundary.bounds) : null,
      tox_nominal_level: design.boundary?.nominalLevel ?? null,
      tox_crossing_probability: design.boundary?.crossingProbability ?? null,
      tox_acceptable: design.bryantDay?.toxAcceptable ?? null,
      tox_unacceptable: design.bryantDay?.toxUnacceptable ?? null,
      alpha_t: design.bryantDay?.alphaT ?? null,
      t1: design.bryantDay?.t1 ?? null,
      t: design.bryantDay?.t ?? null,
      attained_alpha_t: design.bryantDay?.attainedAlphaT ?? null,
      en_high_toxicity: design.bryantDay?.expectedNHighToxicity ?? null,
    })
    .returning('*');
  return toLockedDesign(row);
}
