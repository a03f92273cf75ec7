/**
 * The trial's life, kept per cohort: draft → enrolling stage 1 → interim review →
 * enrolling stage 2 → final analysis → completed, or stopped with a reason. A single-stage design
 * goes from enrolling stage 1 straight to the final analysis. Beside the status, a cohort's accrual
 * can be paused for safety (its safety rule crossed) whatever stage it is in; the pause ends when
 * the statistician applies the committee's "resume accrual" decision, or when the cohort stops or
 * completes. Every transition and every pause is audited.
 */
import type { Knex } from 'knex';
import { writeAudit } from '../audit/audit.js';
import { ConflictError, NotFoundError } from '../http/errors.js';
import { clearSafetyPause, findSafetyReview, lockCohort, setCohortStatus, setSafetyPause } from './trials.repository.js';
import type { CohortStatus, StopCategory } from './trials.schema.js';
import { STATUS_WORDS } from '../words/index.js';

const NEXT: Record<CohortStatus, CohortStatus[]> = {
  draft: ['enrolling_stage_1', 'stopped'],
  enrolling_stage_1: ['interim_review', 'final_analysis', 'stopped'],
  interim_review: ['enrolling_stage_2', 'final_analysis', 'stopped'],
  enrolling_stage_2: ['final_analysis', 'stopped'],
  final_analysis: ['completed', 'stopped'],
  completed: [],
  stopped: [],
};

export function canTransition(from: CohortStatus, to: CohortStatus): boolean {
  return NEXT[from].includes(to);
}

export async function transitionCohort(
  trx: Knex.Transaction,
  input: {
    cohortId: string;
    to: CohortStatus;
    actorUserId: string | null;
    reason?: string | null;
    stopCategory?: StopCategory | null;
    /** Only move when the cohort is still in this state (guards against a concurrent change). */
    from?: CohortStatus;
  },
): Promise<{ from: CohortStatus; to: CohortStatus }> {
  const cohort = await lockCohort(trx, input.cohortId);
  if (!cohort) throw new NotFoundError('The cohort');
  const from = cohort.status;
  if (input.from && input.from !== from) {
    throw new ConflictError(`The cohort is now “${STATUS_WORDS[from].label}”, no longer “${STATUS_WORDS[input.from].label}”.`, { currentStatus: STATUS_WORDS[from].label });
  }
  if (!canTransition(from, input.to)) {
    throw new ConflictError(`A cohort in “${STATUS_WORDS[from].label}” cannot move to “${STATUS_WORDS[input.to].label}”.`, { currentStatus: STATUS_WORDS[from].label });
  }
  if (input.to === 'stopped' && (!input.stopCategory || !input.reason)) {
    throw new ConflictError('Stopping needs a category and a reason.');
  }
  const endsSafetyPause = cohort.safetyPause !== null && (input.to === 'stopped' || input.to === 'completed');
  await setCohortStatus(trx, input.cohortId, {
    status: input.to,
    stopCategory: input.to === 'stopped' ? (input.stopCategory ?? null) : null,
    stopReason: input.to === 'stopped' ? (input.reason ?? null) : null,
    endSafetyPause: endsSafetyPause,
  });
  await writeAudit(trx, {
    actorUserId: input.actorUserId,
    trialId: cohort.trialId,
    entityType: 'cohort',
    entityId: input.cohortId,
    action: 'status_changed',
    before: { status: from },
    after: { status: input.to, stopCategory: input.stopCategory ?? null, ...(endsSafetyPause ? { safetyPauseEnded: true } : {}) },
    reason: input.reason ?? null,
  });
  return { from, to: input.to };
}

/** Statuses in which a cohort may still take patients, and so may be paused for safety. */
const ACCRUING: CohortStatus[] = ['enrolling_stage_1', 'interim_review', 'enrolling_stage_2'];

/**
 * Pauses the cohort's accrual because its safety rule was crossed, in the caller's transaction;
 * false when it was already paused or no longer takes patients. The reason is worded without
 * figures (everyone on the trial reads the cohort's status); `toxicities`, the count that crossed,
 * is kept for the resume.
 */
export async function pauseForSafety(trx: Knex.Transaction, input: { cohortId: string; reason: string; toxicities: number; actorUserId: string | null }): Promise<boolean> {
  const cohort = await lockCohort(trx, input.cohortId);
  if (!cohort) throw new NotFoundError('The cohort');
  if (cohort.safetyPause || !ACCRUING.includes(cohort.status)) return false;
  await setSafetyPause(trx, input.cohortId, { reason: input.reason, toxicities: input.toxicities });
  await writeAudit(trx, {
    actorUserId: input.actorUserId,
    trialId: cohort.trialId,
    entityType: 'cohort',
    entityId: input.cohortId,
    action: 'accrual_paused_for_safety',
    before: { status: cohort.status, safetyPause: null },
    after: { status: cohort.status, safetyPause: { reason: input.reason } },
    reason: input.reason,
  });
  return true;
}

/** The counts behind the cohort's safety pauses (see `findSafetyReview`). */
export async function safetyReviewOf(trx: Knex.Transaction, cohortId: string) {
  return (await findSafetyReview(trx, cohortId)) ?? { pauseToxicities: null, reviewedToxicities: null };
}

/** Ends the cohort's safety pause (the committee reviewed `reviewedToxicities`), in the caller's transaction. */
export async function resumeAfterSafetyReview(trx: Knex.Transaction, input: { cohortId: string; reason: string; actorUserId: string }): Promise<{ reviewedToxicities: number }> {
  const cohort = await lockCohort(trx, input.cohortId);
  if (!cohort) throw new NotFoundError('The cohort');
  if (!cohort.safetyPause) throw new ConflictError(`Cohort ${cohort.code} is not paused for safety.`, { currentStatus: cohort.status });
  const reviewedToxicities = (await findSafetyReview(trx, input.cohortId))?.pauseToxicities ?? 0;
  await clearSafetyPause(trx, input.cohortId, reviewedToxicities);
  await writeAudit(trx, {
    actorUserId: input.actorUserId,
    trialId: cohort.trialId,
    entityType: 'cohort',
    entityId: input.cohortId,
    action: 'accrual_resumed_after_safety_review',
    before: { status: cohort.status, safetyPause: cohort.safetyPause },
    after: { status: cohort.status, safetyPause: null },
    reason: input.reason,
  });
  return { reviewedToxicities };
}
