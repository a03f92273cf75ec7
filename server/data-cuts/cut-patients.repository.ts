/**
 * The frozen patients of a data cut: every patient and assessment in its scope as the cut saw
 * them, written once at the cut (the table is append-only) and read back in cohort and enrolment
 * order. The analysis, the report and the exports read a cut's patients only from here.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Outcome } from '../evaluation/index.js';

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

/** The order a cut keeps its patients in: by cohort code, then enrolment. */
export const byCohortThenSeq = (a: CutPatient, b: CutPatient) =>
  a.cohortCode === b.cohortCode ? a.enrolmentSeq - b.enrolmentSeq : a.cohortCode < b.cohortCode ? -1 : 1;

/** Copies the cut's patients, in batches that keep each statement's parameter count well under PostgreSQL's limit. */
export async function insertCutPatients(trx: Knex.Transaction, cutId: string, patients: CutPatient[]): Promise<void> {
  const copies = patients.map((p) => ({
    data_cut_id: cutId,
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
  for (let i = 0; i < copies.length; i += 500) await trx('data_cut_patients').insert(copies.slice(i, i + 500));
}

export async function readCutPatients(conn: Conn, cutId: string): Promise<CutPatient[]> {
  const rows: CutPatientRow[] = await conn('data_cut_patients').where({ data_cut_id: cutId });
  return rows.map(toCutPatient).sort(byCohortThenSeq);
}

