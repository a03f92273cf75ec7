/**
 * The next milestone of a cohort in plain words ("stage-1 cohort complete in ~5 patients",
 * "committee review pending for 3 days"), from its status, its design and aggregate counts.
 * The "~" is honest: under an evaluable-only protocol, patients found not evaluable are replaced.
 */
import type { CohortStatus } from '../trials/index.js';
import { daysBetween } from '../accrual/index.js';
import { plural, stoppedFor } from '../words/index.js';

export type MilestoneKind =
  | 'design-lock'
  | 'first-enrolment'
  | 'stage-1-complete'
  | 'interim-analysis'
  | 'committee-review'
  | 'enrolment-complete'
  | 'final-analysis'
  | 'none';

export type Milestone = {
  kind: MilestoneKind;
  text: string;
  patientsToGo?: number;
  outcomesPending?: number;
  since?: string;
};

export type MilestoneInput = {
  status: CohortStatus;
  stopCategory: string | null;
  design: { n1: number | null; n: number } | null;
  counted: number;
  pending: number;
  stage1Pending: number;
  /** The oldest data cut still waiting for the committee (date of the cut). */
  reviewPendingSince: string | null;
  today: string;
};

const toGo = (kind: MilestoneKind, what: string, patients: number): Milestone => ({
  kind,
  text: `${what} in ~${plural(patients, 'patient')}`,
  patientsToGo: patients,
});

const finalDue = (pending: number): Milestone => ({
  kind: 'final-analysis',
  text: pending > 0 ? `final analysis due: ${plural(pending, 'outcome')} pending` : 'final analysis due: every outcome is in',
  outcomesPending: pending,
});

export function nextMilestone(input: MilestoneInput): Milestone {
  const { status, design, counted } = input;
  if (status === 'stopped') return { kind: 'none', text: `stopped ${stoppedFor(input.stopCategory)}` };
  if (status === 'completed') return { kind: 'none', text: 'completed' };
  if (!design) return { kind: 'design-lock', text: 'awaiting design lock' };
  if (input.reviewPendingSince) {
    const days = Math.max(0, daysBetween(input.reviewPendingSince, input.today));
    return {
      kind: 'committee-review',
      text: days === 0 ? 'committee review pending since today' : `committee review pending for ${plural(days, 'day')}`,
      since: input.reviewPendingSince,
    };
  }
  if (status === 'draft') return { kind: 'first-enrolment', text: 'awaiting the first enrolment' };
  const interimDue = (): Milestone => ({
    kind: 'interim-analysis',
    text: input.stage1Pending > 0 ? `interim analysis due: ${plural(input.stage1Pending, 'stage-1 outcome')} pending` : 'interim analysis due: stage-1 outcomes are in',
    outcomesPending: input.stage1Pending,
  });
  if (status === 'enrolling_stage_1' && design.n1 !== null) {
    return counted < design.n1 ? toGo('stage-1-complete', 'stage-1 cohort complete', design.n1 - counted) : interimDue();
  }
  if (status === 'interim_review') return interimDue();
  if (status === 'enrolling_stage_1' || status === 'enrolling_stage_2') {
    return counted < design.n ? toGo('enrolment-complete', `full cohort (n = ${design.n}) enrolled`, design.n - counted) : finalDue(input.pending);
  }
  return finalDue(input.pending);
}
