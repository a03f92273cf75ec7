/**
 * The trial's life, kept per cohort: draft → enrolling stage 1 → interim review →
 * enrolling stage 2 → final analysis → completed, or stopped with a reason. A single-stage design
 * goes from enrolling stage 1 straight to the final analysis. Every transition is audited.
 */
import type { Knex } from 'knex';
import { writeAudit } from '../audit/audit.js';
import { ConflictError, NotFoundError } from '../http/errors.js';
import { lockCohort, setCohortStatus } from './trials.repository.js';
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
  await setCohortStatus(trx, input.cohortId, {
    status: input.to,
    stopCategory: input.to === 'stopped' ? (input.stopCategory ?? null) : null,
    stopReason: input.to === 'stopped' ? (input.reason ?? null) : null,
  });
  await writeAudit(trx, {
    actorUserId: input.actorUserId,
    trialId: cohort.trialId,
    entityType: 'cohort',
    entityId: input.cohortId,
    action: 'status_changed',
    before: { status: from },
    after: { status: input.to, stopCategory: input.stopCategory ?? null },
    reason: input.reason ?? null,
  });
  return { from, to: input.to };
}
