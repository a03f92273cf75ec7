/**
 * Builders for data cuts: a cohort with a locked design and patients with outcomes, a cut frozen
 * through the real service, and a committee recommendation signed directly (for arranging the
 * state a test starts from; the signing route itself is tested over HTTP).
 */
import type { Db } from '../../server/db/knex.js';
import { applyWithin, freezeDataCut } from '../../server/data-cuts/data-cuts.service.js';
import type { DataCut } from '../../server/data-cuts/data-cuts.repository.js';
import type { DecisionAction, RecommendationDecision } from '../../server/data-cuts/data-cuts.schema.js';
import { DEMO, ensureUser, type TrialFixture } from './factories.js';
import { signDirectly } from './signature-factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectDesign, type DirectPatient } from './patient-factories.js';

const responders = (k: number): DirectPatient[] => Array.from({ length: k }, () => ({ outcome: 'responder' }));
const nonResponders = (k: number): DirectPatient[] => Array.from({ length: k }, () => ({ outcome: 'non_responder' }));

/** `k` responders then `m` non-responders (in that enrolment order), at one site. */
export function outcomes(k: number, m: number): DirectPatient[] {
  return [...responders(k), ...nonResponders(m)];
}

/**
 * A cohort ready for a cut: its design locked (defaults: Simon's optimal 3/13, 12/43 for p0 0.20,
 * p1 0.40) and patients enrolled per site code with the outcomes given.
 */
export async function arrangeCohort(
  db: Db,
  trial: TrialFixture,
  options: { cohortIndex?: number; design?: Partial<DirectDesign>; patients: Record<string, DirectPatient[]> },
): Promise<{ cohortId: string; designId: string; patientIds: string[] }> {
  const cohortId = trial.cohortIds[options.cohortIndex ?? 0];
  const existing = await db('design_versions').where({ cohort_id: cohortId }).first('id');
  const designId = existing?.id ?? (await lockDesignDirectly(db, { trialId: trial.trialId, cohortId, ...options.design })).designId;
  const patientIds: string[] = [];
  for (const [siteCode, patients] of Object.entries(options.patients)) {
    const created = await enrolPatientsDirectly(db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds[siteCode], patients });
    patientIds.push(...created.map((p) => p.id));
  }
  return { cohortId, designId, patientIds };
}

export async function freezeCutDirectly(db: Db, trial: TrialFixture, options: { cohortId?: string | null; kind?: 'interim' | 'final' } = {}): Promise<DataCut> {
  const statistician = await ensureUser(db, DEMO.statistician);
  return freezeDataCut(
    db,
    { trialId: trial.trialId, cohortId: options.cohortId ?? null, kind: options.kind ?? 'interim' },
    { id: statistician, email: DEMO.statistician },
  );
}

/** A signed recommendation written straight to the database, on the cut's current analysis version; `at` back-dates it (signature and row). */
export async function recommendDirectly(
  db: Db,
  cut: Pick<DataCut, 'id' | 'trialId' | 'seq' | 'contentHash'>,
  email: string,
  decision: RecommendationDecision,
  options: { rationale?: string; at?: Date } = {},
) {
  const { rationale = 'Reviewed at the committee meeting.', at = new Date() } = options;
  const userId = await ensureUser(db, email);
  const signatureId = await signDirectly(db, {
    trialId: cut.trialId,
    signerId: userId,
    signerEmail: email,
    intent: { action: 'recommendation', subjectId: cut.id },
    meaning: `I recommend ${decision} on data cut ${cut.seq} (test fixture)`,
    subjectType: 'recommendation',
    subjectId: cut.id,
    contentHash: cut.contentHash,
    at,
  });
  const version = await db('analysis_versions').where({ data_cut_id: cut.id }).orderBy('version', 'desc').first('id');
  const [row] = await db('recommendations')
    .insert({ data_cut_id: cut.id, member_user_id: userId, decision, rationale, signature_id: signatureId, analysis_version_id: version.id, created_at: at })
    .returning('id');
  return row.id as string;
}

const matrixCuts = new Map<string, Promise<string>>();

/** One real cut on the permission-matrix fixture trial, made once however many routes ask for it. */
export function matrixCut(db: Db, trial: TrialFixture): Promise<string> {
  let cut = matrixCuts.get(trial.trialId);
  if (!cut) {
    cut = (async () => {
      const [siteA, siteB] = Object.keys(trial.siteIds);
      await arrangeCohort(db, trial, { patients: { [siteA]: outcomes(2, 5), [siteB ?? siteA]: outcomes(1, 5) } });
      return (await freezeCutDirectly(db, trial)).id;
    })();
    matrixCuts.set(trial.trialId, cut);
  }
  return cut;
}

/**
 * A cut released as the committee's process releases one: frozen through the service, a member's
 * recommendation, and the statistician's decision applied through the service (which keeps the
 * released figures and queues the decision mail). Resuming stage 2 by default.
 */
export async function releaseCutDirectly(
  db: Db,
  trial: TrialFixture,
  options: { cohortId?: string; action?: DecisionAction; recommendation?: RecommendationDecision } = {},
): Promise<DataCut> {
  const cohortId = options.cohortId ?? trial.cohortIds[0];
  const cut = await freezeCutDirectly(db, trial, { cohortId });
  await recommendDirectly(db, cut, DEMO.monitor, options.recommendation ?? 'continue');
  const statistician = await ensureUser(db, DEMO.statistician);
  await db.transaction((trx) =>
    applyWithin(trx, cut.id, { action: options.action ?? 'resume_stage_2', reason: 'The committee recommends continuing (test fixture).', cohortId }, { id: statistician, email: DEMO.statistician }),
  );
  return cut;
}
