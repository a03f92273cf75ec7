/**
 * The Portfolio: one row per cohort of every trial the user belongs to — status, stage,
 * enrolment against n1 and n, the next milestone, the committee's last recommendation — built
 * from aggregate queries only.
 *
 * Sponsors (users whose only role on a trial is sponsor) get aggregate counts. Response figures
 * (responders, known outcomes, response rate) reach them only where the design lets the sponsor
 * see response or a data cut of the cohort was released to the sponsor; otherwise the keys are
 * left out of the row entirely and `responseFiguresHidden` says why. Site staff (coordinators and
 * investigators without a trial-wide role) follow the same rule: their scope is their own
 * sites, so trial-wide response figures are theirs only once released.
 */
import type { Db } from '../db/knex.js';
import type { Role, SessionUser } from '../auth/access.js';
import { listTrialsForUser, type Cohort, type TrialForUser } from '../trials/index.js';
import { currentDesigns, type LockedDesign } from '../designs/index.js';
import type { RecommendationDecision } from '../data-cuts/index.js';
import { RECOMMENDATION_WORDS, STATUS_WORDS } from '../words/index.js';
import { cohortTallies, countsUnder, designTargets, emptyTally, enrolmentCounts, type DesignTargets, type EnrolmentCounts } from '../accrual/index.js';
import { committeeStates, type CommitteeState } from './portfolio.repository.js';
import { nextMilestone, type Milestone } from './milestone.js';
import type { PortfolioFilter } from './portfolio.schema.js';

export type Progress = { counted: number; target: number; fraction: number };

export type ResponseFigures = { responders: number; outcomesKnown: number; responseRate: number | null; stage1Responders: number };

export type PortfolioRow = EnrolmentCounts & {
  trialId: string;
  trialCode: string;
  trialTitle: string;
  indication: string;
  sponsorName: string | null;
  myRoles: Role[];
  /** 'sponsor' when the user's only role on the trial is sponsor; 'site' for site staff without a trial-wide role. */
  view: RowView;
  cohortId: string;
  cohortCode: string;
  cohortName: string;
  cohortCount: number;
  status: Cohort['status'];
  statusWords: string;
  stage: 1 | 2 | null;
  stageWords: string;
  design: DesignTargets | null;
  progress: { n1: Progress | null; n: Progress | null };
  nextMilestone: Milestone;
  lastRecommendation: { decision: string; words: string; on: string } | null;
  committeeReviewPendingSince: string | null;
  releasedToSponsorAt: string | null;
  responseFiguresHidden: boolean;
  /** Why the response figures are hidden, in a sentence; only when they are. */
  responseFiguresHiddenReason?: string;
} & Partial<ResponseFigures>;

export type Portfolio = {
  asOf: string;
  rows: PortfolioRow[];
  /** Every indication among the user's trials, for the filter (whatever the current filter). */
  indications: string[];
};

export type RowView = 'full' | 'sponsor' | 'site';

const TRIAL_WIDE_ROLES: readonly Role[] = ['admin', 'statistician', 'monitor'];

/** How a user with these roles on a trial sees its rows. */
export function viewFor(roles: readonly Role[]): RowView {
  if (roles.some((role) => TRIAL_WIDE_ROLES.includes(role))) return 'full';
  return roles.every((role) => role === 'sponsor') ? 'sponsor' : 'site';
}

const HIDDEN_REASON: Record<Exclude<RowView, 'full'>, string> = {
  sponsor: 'Response figures are shown to sponsors only when the protocol allows it or the statistician releases a data cut.',
  site: 'Trial-wide response figures are shown to site staff only when the protocol allows it or the statistician releases a data cut; your own patients are on the Patients page.',
};

/** Whether response figures may be shown, and if not, why. */
export function responseVisibility(
  view: RowView,
  design: Pick<LockedDesign, 'sponsorSeesResponse'> | undefined,
  committee: Pick<CommitteeState, 'releasedToSponsorAt'> | undefined,
): { visible: true } | { visible: false; reason: string } {
  if (view === 'full' || design?.sponsorSeesResponse || committee?.releasedToSponsorAt) return { visible: true };
  return { visible: false, reason: HIDDEN_REASON[view] };
}

function stageOf(status: Cohort['status'], design: LockedDesign | undefined, counted: number): PortfolioRow['stage'] {
  if (!design || status === 'draft') return null;
  if (design.n1 === null) return 1;
  if (status === 'enrolling_stage_2') return 2;
  if (status === 'enrolling_stage_1' || status === 'interim_review') return 1;
  return counted > design.n1 ? 2 : 1;
}

const progress = (counted: number, target: number | null | undefined): Progress | null =>
  target ? { counted, target, fraction: Math.min(1, counted / target) } : null;

function decisionWords(decision: string): string {
  return RECOMMENDATION_WORDS[decision as RecommendationDecision]?.label ?? 'a recommendation';
}

/** One row per cohort; `sponsorViewAlways` renders every row as a sponsor sees it (the digest). */
export async function portfolioRows(
  db: Db,
  trials: TrialForUser[],
  options: { today: string; sponsorViewAlways?: boolean },
): Promise<PortfolioRow[]> {
  const { today } = options;
  const cohortIds = trials.flatMap((t) => t.cohorts.map((c) => c.id));
  const [designs, tallies, committee] = await Promise.all([currentDesigns(db, cohortIds), cohortTallies(db, cohortIds, today), committeeStates(db, cohortIds)]);
  return trials.flatMap((trial) => {
    const view = options.sponsorViewAlways ? 'sponsor' : viewFor(trial.myRoles);
    return trial.cohorts.map((cohort): PortfolioRow => {
      const design = designs.get(cohort.id);
      const tally = tallies.get(cohort.id) ?? emptyTally(cohort.id);
      const counts = countsUnder(tally, design?.analysisPopulation ?? 'all_enrolled');
      const state = committee.get(cohort.id);
      const stage = stageOf(cohort.status, design, counts.counted);
      const visibility = responseVisibility(view, design, state);
      const row: PortfolioRow = {
        trialId: trial.id,
        trialCode: trial.code,
        trialTitle: trial.title,
        indication: trial.indication,
        sponsorName: trial.sponsorName,
        myRoles: trial.myRoles,
        view,
        cohortId: cohort.id,
        cohortCode: cohort.code,
        cohortName: cohort.name,
        cohortCount: trial.cohorts.length,
        status: cohort.status,
        statusWords: STATUS_WORDS[cohort.status].label,
        stage,
        stageWords: stage === null ? 'not started' : design?.n1 === null ? 'single stage' : `stage ${stage}`,
        design: designTargets(design),
        ...enrolmentCounts(counts, tally),
        progress: { n1: progress(counts.counted, design?.n1), n: progress(counts.counted, design?.n) },
        nextMilestone: nextMilestone({
          status: cohort.status,
          stopCategory: cohort.stopCategory,
          design: design ? { n1: design.n1, n: design.n } : null,
          counted: counts.counted,
          pending: counts.pending,
          stage1Pending: counts.stage1Pending,
          reviewPendingSince: state?.reviewPendingSince ?? null,
          today,
        }),
        lastRecommendation: state?.lastRecommendation
          ? { ...state.lastRecommendation, words: decisionWords(state.lastRecommendation.decision) }
          : null,
        committeeReviewPendingSince: state?.reviewPendingSince ?? null,
        releasedToSponsorAt: state?.releasedToSponsorAt ?? null,
        responseFiguresHidden: !visibility.visible,
      };
      if (!visibility.visible) return { ...row, responseFiguresHiddenReason: visibility.reason };
      const outcomesKnown = counts.counted - counts.pending;
      return {
        ...row,
        responders: counts.responders,
        outcomesKnown,
        responseRate: outcomesKnown > 0 ? counts.responders / outcomesKnown : null,
        stage1Responders: counts.stage1Responders,
      };
    });
  });
}

export async function portfolioFor(db: Db, user: SessionUser, filter: PortfolioFilter, today: string): Promise<Portfolio> {
  const trials = await listTrialsForUser(db, user.id);
  const indications = [...new Set(trials.map((t) => t.indication))].sort((a, b) => a.localeCompare(b));
  const wanted = filter.indication?.toLowerCase();
  const chosen = wanted ? trials.filter((t) => t.indication.toLowerCase().includes(wanted)) : trials;
  const rows = await portfolioRows(db, chosen, { today });
  return { asOf: today, rows: filter.status ? rows.filter((r) => r.status === filter.status) : rows, indications };
}
