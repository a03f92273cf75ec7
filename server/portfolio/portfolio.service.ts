/**
 * The Portfolio: one row per cohort of every trial the user belongs to — status, stage,
 * enrolment against n1 and n, the next milestone, the committee's last recommendation — built
 * from aggregate queries only.
 *
 * Every row is computed in full, then projected by the visibility rule (server/auth/visibility.ts)
 * for the user's roles on that trial: live response figures (responders, decided patients, rate,
 * stage-1 responders) and the committee's last recommendation only for the statistician and
 * committee members, or where the locked design lets sponsors see response; the figures of the
 * cut a committee decision released, labelled with the cut's date, for sponsors and site staff;
 * operational counts only for the trial manager. Hidden keys are absent and `efficacyHidden` says why.
 * What each trial's rows are computed from is read once per data version of the trial and day
 * (server/db/trial-versions.ts); the user's trials and roles are read on every request.
 */
import type { Db, FirstRead } from '../db/knex.js';
import { deepFreeze, inOneSnapshot, trialDataVersions, VersionedCache } from '../db/trial-versions.js';
import type { Role, SessionUser, TrialAccess } from '../auth/access.js';
import { efficacyView, projectEfficacy, type Projected } from '../auth/visibility.js';
import { listTrialsForUser, type Cohort, type TrialForUser } from '../trials/index.js';
import { currentDesigns, type LockedDesign } from '../designs/index.js';
import { latestReleased, type ReleasedFigures } from '../evaluation/index.js';
import type { RecommendationDecision } from '../data-cuts/index.js';
import { RECOMMENDATION_WORDS, STATUS_WORDS } from '../words/index.js';
import { cohortTallies, countsUnder, designTargets, emptyTally, enrolmentCounts, type CohortTally, type DesignTargets, type EnrolmentCounts } from '../accrual/index.js';
import { committeeStates, type CommitteeState } from './portfolio.repository.js';
import { nextMilestone, type Milestone } from './milestone.js';
import type { PortfolioFilter } from './portfolio.schema.js';

export type Progress = { counted: number; target: number; fraction: number };

export type ResponseFigures = { responders: number; outcomesKnown: number; responseRate: number | null; stage1Responders: number };

/** A released cut's response figures, in the row's terms, with the cut they stand at. */
export type ReleasedResponse = ResponseFigures & { cutId: string; cutSeq: number; cutAt: string; releasedAt: string };

/** A row as computed, before the visibility rule. */
type ComputedRow = EnrolmentCounts &
  ResponseFigures & {
    trialId: string;
    trialCode: string;
    trialTitle: string;
    indication: string;
    sponsorName: string | null;
    myRoles: Role[];
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
  };

/** Keys of a row that carry live efficacy; a recommendation is a verdict on unreleased figures. */
const LIVE_KEYS = ['responders', 'outcomesKnown', 'responseRate', 'stage1Responders', 'lastRecommendation'] as const;

export type PortfolioRow = Projected<ComputedRow, (typeof LIVE_KEYS)[number], ReleasedResponse>;

export type Portfolio = {
  asOf: string;
  rows: PortfolioRow[];
  /** Every indication among the user's trials, for the filter (whatever the current filter). */
  indications: string[];
};

const releasedResponse = (figures: ReleasedFigures): ReleasedResponse => ({
  responders: figures.counts.responders,
  outcomesKnown: figures.counts.decided,
  responseRate: figures.responseRate?.estimate ?? null,
  stage1Responders: figures.counts.stage1.responders,
  cutId: figures.cutId,
  cutSeq: figures.cutSeq,
  cutAt: figures.cutAt,
  releasedAt: figures.releasedAt,
});

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

/** What the rows of a trial's cohorts are computed from, by cohort (a cohort without patients has no tally). */
type CohortFigures = {
  designs: Map<string, LockedDesign>;
  tallies: Map<string, CohortTally>;
  committee: Map<string, CommitteeState>;
  released: Map<string, ReleasedFigures>;
};

const figuresByTrial = new VersionedCache<CohortFigures>(1000);

async function cohortFigures(db: Db, trials: TrialForUser[], today: string): Promise<CohortFigures> {
  const key = (trialId: string) => `${trialId}|${today}`;
  const found: CohortFigures = { designs: new Map(), tallies: new Map(), committee: new Map(), released: new Map() };
  const add = (figures: CohortFigures) => {
    for (const part of ['designs', 'tallies', 'committee', 'released'] as const) for (const [id, value] of figures[part]) (found[part] as Map<string, unknown>).set(id, value);
  };
  const missing = trials.filter((trial) => {
    // The version came with the trial list (one statement): a write after it leaves a version the cache does not hold.
    const hit = figuresByTrial.get(key(trial.id), trial.dataVersion);
    if (hit) add(hit);
    return !hit;
  });
  if (missing.length === 0) return found;
  await inOneSnapshot(db, async (trx) => {
    const fresh = await trialDataVersions(trx, missing.map((t) => t.id));
    const cohortIds = missing.flatMap((t) => t.cohorts.map((c) => c.id));
    // One after another: a transaction's queries share its one connection.
    const all: CohortFigures = {
      designs: await currentDesigns(trx, cohortIds),
      tallies: await cohortTallies(trx, cohortIds, today),
      committee: await committeeStates(trx, cohortIds),
      released: await latestReleased(trx, cohortIds),
    };
    for (const trial of missing) {
      const own = new Set(trial.cohorts.map((c) => c.id));
      const mine = <T>(map: Map<string, T>) => new Map([...map].filter(([id]) => own.has(id)));
      const figures: CohortFigures = { designs: mine(all.designs), tallies: mine(all.tallies), committee: mine(all.committee), released: mine(all.released) };
      figuresByTrial.set(key(trial.id), fresh.get(trial.id) as number, figures);
      add(figures);
    }
  });
  return found;
}

/**
 * One row per cohort, each projected for the viewer's roles on its trial; `viewAs` projects every
 * row for the given access instead (the digest: as a sponsor sees it, whatever else the recipient holds).
 */
export async function portfolioRows(
  db: Db,
  trials: TrialForUser[],
  options: { today: string; viewAs?: Pick<TrialAccess, 'roles' | 'siteIds'> },
): Promise<PortfolioRow[]> {
  const { today } = options;
  const { designs, tallies, committee, released } = await cohortFigures(db, trials, today);
  return trials.flatMap((trial) => {
    const access = options.viewAs ?? { roles: trial.myRoles, siteIds: [] };
    return trial.cohorts.map((cohort): PortfolioRow => {
      const design = designs.get(cohort.id);
      const tally = tallies.get(cohort.id) ?? emptyTally(cohort.id);
      const counts = countsUnder(tally, design?.analysisPopulation ?? 'all_enrolled');
      const state = committee.get(cohort.id);
      const stage = stageOf(cohort.status, design, counts.counted);
      const outcomesKnown = counts.counted - counts.pending;
      const row: ComputedRow = {
        trialId: trial.id,
        trialCode: trial.code,
        trialTitle: trial.title,
        indication: trial.indication,
        sponsorName: trial.sponsorName,
        myRoles: trial.myRoles,
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
        responders: counts.responders,
        outcomesKnown,
        responseRate: outcomesKnown > 0 ? counts.responders / outcomesKnown : null,
        stage1Responders: counts.stage1Responders,
      };
      const figures = released.get(cohort.id);
      const view = efficacyView(access, { sponsorSeesResponse: design?.sponsorSeesResponse ?? false, released: figures !== undefined });
      return projectEfficacy(view, row, LIVE_KEYS, { released: figures && releasedResponse(figures) });
    });
  });
}

// Whole Portfolios, frozen, by what they are made of: the day, the filter, and each trial with the viewer's roles on it and its data version.
const portfolios = new VersionedCache<Portfolio>(100);

/** `read` runs the first statement (a route passes one that confirms its session in it). */
export async function portfolioFor(db: Db, user: SessionUser, filter: PortfolioFilter, today: string, read?: FirstRead): Promise<Portfolio> {
  const trials = await listTrialsForUser(db, user.id, read);
  const key = JSON.stringify([today, filter.indication ?? null, filter.status ?? null, trials.map((t) => [t.id, t.myRoles, t.dataVersion])]);
  const kept = portfolios.get(key, 0);
  if (kept) return kept;
  const indications = [...new Set(trials.map((t) => t.indication))].sort((a, b) => a.localeCompare(b));
  const wanted = filter.indication?.toLowerCase();
  const chosen = wanted ? trials.filter((t) => t.indication.toLowerCase().includes(wanted)) : trials;
  const rows = await portfolioRows(db, chosen, { today });
  const portfolio = deepFreeze({ asOf: today, rows: filter.status ? rows.filter((r) => r.status === filter.status) : rows, indications });
  portfolios.set(key, 0, portfolio);
  return portfolio;
}
