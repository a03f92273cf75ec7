/**
 * Builders for patients and locked designs, writing straight to the database so a test can arrange
 * a trial at any point of its life (stage 1 full, paused, stage 2 …) without walking the API.
 */
import type { Db } from '../../server/db/knex.js';
import { assignStages, type AnalysisPopulation, type Outcome } from '../../server/evaluation/counting.js';
import { operatingCharacteristics } from '../../server/stats/index.js';
import { DEMO, ensureUser } from './factories.js';
import { signDirectly } from './signature-factories.js';

export type DirectDesign = {
  cohortId: string;
  trialId: string;
  p0?: number;
  p1?: number;
  alpha?: number;
  beta?: number;
  /** Leave r1 and n1 out (or null) for a single-stage design. */
  r1?: number | null;
  n1?: number | null;
  r?: number;
  n?: number;
  analysisPopulation?: AnalysisPopulation;
  interimAccrual?: 'pause' | 'continue_at_risk';
  sponsorSeesResponse?: boolean;
  /** The cohort's status after locking; a draft cohort starts enrolling by default. */
  cohortStatus?: string;
  /** Further columns of the design version (a safety rule), written with it: the rows are append-only. */
  columns?: Record<string, unknown>;
};

/**
 * Locks a design for a cohort as the Designs page would: a signed design version. Defaults are
 * Simon's optimal design for p0 0.20, p1 0.40, α 0.05, β 0.20 (3/13, 12/43).
 */
export async function lockDesignDirectly(db: Db, input: DirectDesign): Promise<{ designId: string; signatureId: string; version: number }> {
  const p0 = input.p0 ?? 0.2;
  const twoStage = input.r1 !== null && input.n1 !== null;
  const r1 = twoStage ? (input.r1 ?? 3) : null;
  const n1 = twoStage ? (input.n1 ?? 13) : null;
  const r = input.r ?? 12;
  const n = input.n ?? 43;
  const p1 = input.p1 ?? 0.4;
  const rule = r1 === null || n1 === null ? { r, n } : { r1, n1, r, n };
  const [atP0, atP1] = operatingCharacteristics(rule, [p0, p1]);
  const signerId = await ensureUser(db, DEMO.statistician);
  const previous = await db('design_versions').where({ cohort_id: input.cohortId }).max({ version: 'version' }).first();
  const version = Number(previous?.version ?? 0) + 1;
  const action = version === 1 ? 'design' : 'amendment';
  const signatureId = await signDirectly(db, {
    trialId: input.trialId,
    signerId,
    signerEmail: DEMO.statistician,
    intent: { action, subjectId: input.cohortId },
    meaning: 'I approve this design for the protocol (test fixture)',
    subjectType: action,
    subjectId: input.cohortId,
    contentHash: 'test-fixture',
  });
  const [design] = await db('design_versions')
    .insert({
      cohort_id: input.cohortId,
      version,
      selection: twoStage ? 'optimal' : 'single_stage',
      p0,
      p1,
      alpha: input.alpha ?? 0.05,
      beta: input.beta ?? 0.2,
      r1,
      n1,
      r,
      n,
      en0: atP0.expectedN,
      pet0: atP0.pet,
      type_i_error: atP0.probPromising,
      power: atP1.probPromising,
      analysis_population: input.analysisPopulation ?? 'all_enrolled',
      interim_accrual: input.interimAccrual ?? 'pause',
      sponsor_sees_response: input.sponsorSeesResponse ?? false,
      signature_id: signatureId,
      created_by: signerId,
      amendment_reason: version === 1 ? null : 'Amended in a test',
      ...input.columns,
    })
    .returning('id');
  if (input.cohortStatus) await db('cohorts').where({ id: input.cohortId }).update({ status: input.cohortStatus });
  else await db('cohorts').where({ id: input.cohortId, status: 'draft' }).update({ status: 'enrolling_stage_1' });
  return { designId: design.id, signatureId, version };
}

export type DirectPatient = {
  outcome?: Outcome;
  bestOverallResponse?: 'CR' | 'PR' | 'SD' | 'PD' | 'NE' | null;
  evaluable?: boolean;
  notEvaluableReason?: string | null;
  enrolledOn?: string;
  responseAssessedOn?: string | null;
  studyId?: string;
};

const DEFAULT_RESPONSE: Record<Outcome, 'PR' | 'SD' | null> = { responder: 'PR', non_responder: 'SD', pending: null };

function addDays(date: string, days: number): string {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/**
 * Enrols patients into a cohort at a site, in order, with the outcomes given (or `count` pending
 * patients). Study IDs are the site code and the next free number; stages follow the cohort's
 * locked design when there is one.
 */
export async function enrolPatientsDirectly(
  db: Db,
  input: { trialId: string; cohortId: string; siteId: string; patients?: DirectPatient[]; count?: number; firstEnrolledOn?: string },
): Promise<Array<{ id: string; studyId: string }>> {
  const site = await db('sites').where({ id: input.siteId }).first('code');
  const specs: DirectPatient[] = input.patients ?? Array.from({ length: input.count ?? 1 }, () => ({}));
  const created: Array<{ id: string; studyId: string }> = [];
  const [{ max: lastSeq }] = await db('patients').where({ cohort_id: input.cohortId }).max({ max: 'enrolment_seq' });
  const [{ count: atSite }] = await db('patients').where({ trial_id: input.trialId, site_id: input.siteId }).count({ count: '*' });
  let seq = Number(lastSeq ?? 0);
  let number = Number(atSite);
  const firstOn = input.firstEnrolledOn ?? '2026-03-02';
  for (const [index, spec] of specs.entries()) {
    seq += 1;
    number += 1;
    const outcome = spec.outcome ?? 'pending';
    const evaluable = spec.evaluable ?? true;
    const enrolledOn = spec.enrolledOn ?? addDays(firstOn, index);
    const studyId = spec.studyId ?? `${site.code}-${String(number).padStart(3, '0')}`;
    const [row] = await db('patients')
      .insert({
        trial_id: input.trialId,
        cohort_id: input.cohortId,
        site_id: input.siteId,
        study_id: studyId,
        enrolled_on: enrolledOn,
        enrolment_seq: seq,
        outcome,
        best_overall_response: spec.bestOverallResponse !== undefined ? spec.bestOverallResponse : DEFAULT_RESPONSE[outcome],
        response_assessed_on:
          spec.responseAssessedOn !== undefined ? spec.responseAssessedOn : outcome === 'pending' ? null : addDays(enrolledOn, 56),
        evaluable,
        not_evaluable_reason: evaluable ? null : (spec.notEvaluableReason ?? 'Withdrew before the first assessment'),
      })
      .returning('id');
    created.push({ id: row.id, studyId });
  }
  await restageDirectly(db, input.cohortId);
  return created;
}

/** Re-derives every patient's stage in a cohort from its locked design (as the server does after a write). */
export async function restageDirectly(db: Db, cohortId: string): Promise<void> {
  const design = await db('design_versions').where({ cohort_id: cohortId }).orderBy('version', 'desc').first('n1', 'analysis_population');
  const rows: Array<{ id: string; enrolment_seq: number; outcome: Outcome; evaluable: boolean }> = await db('patients')
    .where({ cohort_id: cohortId })
    .select('id', 'enrolment_seq', 'outcome', 'evaluable');
  const stages = assignStages(
    rows.map((r) => ({ id: r.id, enrolmentSeq: r.enrolment_seq, outcome: r.outcome, evaluable: r.evaluable })),
    design?.n1 ?? null,
    (design?.analysis_population ?? 'all_enrolled') as AnalysisPopulation,
  );
  for (const [id, stage] of stages) await db('patients').where({ id }).update({ stage });
}
