/**
 * The two-stage rule as the server enforces it on accrual. Stages follow enrolment order against
 * the locked design's n1 (counting patients the way the protocol's analysis population says).
 * Once stage 1 holds n1 counting patients the cohort moves to interim review, the trial's
 * statistician(s) and committee members get one e-mail each, and enrolment is refused until the
 * review ends — unless the design lets accrual continue at risk.
 */
import type { Knex } from 'knex';
import { ConflictError } from '../http/errors.js';
import { recipientRoles } from '../auth/visibility.js';
import { enqueueMail } from '../mail/outbox.js';
import { currentDesign, type LockedDesign } from '../designs/index.js';
import { assignStages, countCounting, countsToward, tally, type AnalysisPopulation, type CountablePatient } from '../evaluation/index.js';
import { findCohort, transitionCohort, trialCode, type Cohort } from '../trials/index.js';
import { memberEmails } from '../people/index.js';
import { DECISION_SUPPORT_ONLY, INTERIM_DATA, POPULATION_IN_A_SENTENCE, SAFETY_PAUSED, STATUS_IN_A_SENTENCE, plural } from '../words/index.js';
import { countablePatients, currentStages, setStage } from './patients.repository.js';

/** Refuses an enrolment the cohort's state or design does not allow (409, with the reason in words). */
export function assertCohortEnrolling(cohort: Pick<Cohort, 'code' | 'status' | 'safetyPause'>, design: LockedDesign | undefined): LockedDesign {
  if (!design) throw new ConflictError(`Cohort ${cohort.code} has no locked design yet, so it cannot enrol patients.`, { cohortStatus: cohort.status });
  if (cohort.safetyPause) {
    throw new ConflictError(
      `${SAFETY_PAUSED} of cohort ${cohort.code}: ${cohort.safetyPause.reason} Enrolment resumes only when the statistician applies the committee's decision to resume accrual.`,
      { cohortStatus: cohort.status, safetyPause: cohort.safetyPause },
    );
  }
  if (cohort.status === 'enrolling_stage_1' || cohort.status === 'enrolling_stage_2') return design;
  if (cohort.status === 'interim_review') {
    if (design.interimAccrual === 'continue_at_risk') return design;
    throw new ConflictError(
      `Accrual is paused for the interim review of cohort ${cohort.code}: stage 1 is complete (n1 = ${design.n1}). The protocol does not allow enrolment at risk; enrolment resumes when the review ends and stage 2 opens.`,
      { cohortStatus: cohort.status },
    );
  }
  throw new ConflictError(`Cohort ${cohort.code} is ${STATUS_IN_A_SENTENCE[cohort.status]} and does not enrol patients.`, { cohortStatus: cohort.status });
}

export type AccrualOutcome = { paused: boolean; continuesAtRisk: boolean };

/**
 * Whether a change of evaluability can move the cohort's stages, and so its stage-1 count: only
 * under a two-stage design that counts the evaluable population.
 */
export function evaluabilityMovesStages(design: LockedDesign | undefined): boolean {
  return design !== undefined && design.n1 !== null && design.analysisPopulation === 'evaluable';
}

/** The moment of the interim review: a two-stage cohort still in stage 1 whose counted patients reached n1. */
export function stageOneComplete(design: LockedDesign | undefined, status: Cohort['status'], counted: number): boolean {
  return design !== undefined && design.n1 !== null && design.r1 !== null && status === 'enrolling_stage_1' && counted >= design.n1;
}

export type CohortReplay = {
  /** Each change's patient's stage as that change meets it: an earlier change of evaluability in the list may have moved it. */
  stages: Array<1 | 2>;
  /** The index of the change at which stage 1 completes (the accrual rules start the interim review there), if one does. */
  completesStageOne: number | undefined;
};

/**
 * Replays changes to one cohort's known patients, in order, the way the accrual rules meet them
 * one at a time (`applyAccrualRules` after each): a change of evaluability restages the cohort
 * where that can move stages, and stage 1 completes at the first change after which the counted
 * patients reach n1 while the cohort is still in stage 1. `patients` is every patient of the
 * cohort as stored before the first change, `stored` the stages stored for the changed ones.
 * Pure, so a batch of changes can be written together and still be audited as row after row.
 */
export function replayCohort(
  design: LockedDesign | undefined,
  status: Cohort['status'],
  patients: readonly CountablePatient[],
  stored: ReadonlyMap<string, 1 | 2>,
  changes: ReadonlyArray<{ patientId: string; evaluable: boolean }>,
): CohortReplay {
  const population = design?.analysisPopulation ?? 'all_enrolled';
  const state = patients.map((p) => ({ ...p }));
  const byId = new Map(state.map((p) => [p.id, p]));
  let counted = state.filter((p) => countsToward(p, population)).length;
  // The stages as the cohort stands: as stored, until a change restages it (`restageCohort`'s rule).
  let stages: ReadonlyMap<string, 1 | 2> = stored;
  const met: Array<1 | 2> = [];
  let completesStageOne: number | undefined;
  changes.forEach((change, index) => {
    const patient = byId.get(change.patientId);
    if (!patient) throw new Error(`replayCohort: patient ${change.patientId} is not in the cohort`);
    met.push(stages.get(patient.id) ?? 1);
    if (patient.evaluable !== change.evaluable) {
      if (countsToward(patient, population)) counted -= 1;
      patient.evaluable = change.evaluable;
      if (countsToward(patient, population)) counted += 1;
      if (evaluabilityMovesStages(design)) stages = assignStages(state, design?.n1 ?? null, population);
    }
    if (completesStageOne === undefined && stageOneComplete(design, status, counted)) completesStageOne = index;
  });
  return { stages: met, completesStageOne };
}

/**
 * Re-derives the stage of every patient of the cohort (the first n1 counting patients are stage 1)
 * and stores the ones that moved, in two statements. Called when an evaluability change or a new
 * design version (another n1 or analysis population) can move the boundary.
 */
export async function restageCohort(trx: Knex.Transaction, cohortId: string, n1: number | null, population: AnalysisPopulation): Promise<void> {
  const patients = (await countablePatients(trx, [cohortId])).get(cohortId) ?? [];
  const stages = assignStages(patients, n1, population);
  const stored = await currentStages(trx, cohortId);
  const moved = (stage: 1 | 2) => [...stages].filter(([id, s]) => s === stage && stored.get(id) !== s).map(([id]) => id);
  await setStage(trx, moved(1), 1);
  await setStage(trx, moved(2), 2);
}

/**
 * Applies the accrual rules after an enrolment or an outcome change, inside the caller's
 * transaction (the cohort row is locked by `transitionCohort`). The trial's code, for the mail, is
 * read only when the caller does not know it and a mail is sent. Stages are re-derived only when an
 * evaluability change can move them (evaluable population); otherwise a new patient's stage, set
 * at enrolment, never changes.
 */
export async function applyAccrualRules(
  trx: Knex.Transaction,
  input: { trialId: string; trialCode?: string; cohortId: string; actorUserId: string; evaluabilityChanged?: boolean },
): Promise<AccrualOutcome> {
  const design = await currentDesign(trx, input.cohortId);
  const n1 = design?.n1 ?? null;
  const population = design?.analysisPopulation ?? 'all_enrolled';
  if (input.evaluabilityChanged && evaluabilityMovesStages(design)) await restageCohort(trx, input.cohortId, n1, population);

  const none = { paused: false, continuesAtRisk: false };
  if (!design || n1 === null || design.r1 === null) return none;
  const cohort = await findCohort(trx, input.trialId, input.cohortId);
  if (!cohort || !stageOneComplete(design, cohort.status, await countCounting(trx, input.cohortId, population))) return none;
  const counts = tally((await countablePatients(trx, [input.cohortId])).get(input.cohortId) ?? [], n1, population);

  await transitionCohort(trx, {
    cohortId: input.cohortId,
    from: 'enrolling_stage_1',
    to: 'interim_review',
    actorUserId: input.actorUserId,
    reason: `Stage 1 complete: ${n1} patients counted (${POPULATION_IN_A_SENTENCE[population]} population).`,
  });
  const atRisk = design.interimAccrual === 'continue_at_risk';
  // The message carries stage-1 responder counts: live efficacy, for the statistician and committee only.
  const recipients = await memberEmails(trx, input.trialId, recipientRoles('live-efficacy', ['statistician', 'monitor']));
  const label = `${input.trialCode ?? (await trialCode(trx, input.trialId)) ?? ''} ${cohort.code}`;
  const accrualLine = atRisk
    ? 'The protocol lets accrual continue at risk during the review: sites may keep enrolling.'
    : 'Accrual is paused: the server refuses further enrolment in this cohort until the review ends and stage 2 opens.';
  await enqueueMail(
    trx,
    recipients.map((to) => ({
      kind: 'interim_review',
      to,
      subject: `${label}: stage 1 complete — interim review`,
      text: [
        `Stage 1 of ${label} is complete: ${n1} patients are counted (${POPULATION_IN_A_SENTENCE[population]} population).`,
        `So far ${plural(counts.stage1.responders, 'responder')} among ${plural(counts.stage1.decided, 'decided patient')}; ${plural(counts.stage1.pending, 'outcome')} pending.`,
        `The stage-1 rule of the locked design (version ${design.version}): stop for futility with ${design.r1} or fewer responders among ${n1}.`,
        accrualLine,
        '',
        `${DECISION_SUPPORT_ONLY} ${INTERIM_DATA}`,
      ].join('\n'),
      dedupeKey: `interim-review:${input.cohortId}:v${design.version}:${to}`,
    })),
  );
  return { paused: !atRisk, continuesAtRisk: atRisk };
}
