/**
 * The Accrual page's figures: cumulative enrolment against the plan (overall and by site), the
 * per-site table, projections of the dates n1 and n are reached, and warnings for sites that
 * have enrolled nobody for the trial's configured number of weeks. Aggregate counts only: there
 * are no response figures here, so every role of the trial reads the same kind of content
 * (site roles see their own sites' rows). The page for every site is computed once per data version
 * of the trial and day (server/db/trial-versions.ts).
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { inOneSnapshot, currentDataVersion, deepFreeze, keptFrozen, trialDataVersion, VersionedCache } from '../db/trial-versions.js';
import type { Actor } from '../auth/access.js';
import { operationalSites } from '../auth/visibility.js';
import { NotFoundError } from '../http/errors.js';
import { findProtocolSettings, findTrial, type Cohort, type Trial } from '../trials/index.js';
import { currentDesigns, type LockedDesign } from '../designs/index.js';
import type { AnalysisPopulation } from '../evaluation/index.js';
import {
  cohortTallies,
  emptyTally,
  monthlyBySite,
  recentMonthCounts,
  siteTallies,
  weeklyCounts,
  type CohortTally,
  type MonthCount,
  type SiteTally,
} from './accrual.repository.js';
import { daysBetween, firstOfMonth } from './calendar.js';
import { daysOpen, projectTarget, rangeMonths, rateWindow, type Projection, type RateWindow } from './projection.js';
import { cumulativeSeries, type Plan, type SeriesPoint } from './timeline.js';
import { STATUS_IN_A_SENTENCE } from '../words/index.js';

/** A cohort's counts under its protocol's analysis population (see server/evaluation/counting.ts). */
export type CohortCounts = {
  enrolled: number;
  /** Patients counting toward n1 and n. */
  counted: number;
  evaluable: number;
  /** Counting patients whose outcome is not yet known. */
  pending: number;
  responders: number;
  stage1Counted: number;
  stage1Pending: number;
  stage1Responders: number;
  windowCounted: number;
  lastWeekEnrolled: number;
};

export function countsUnder(tally: CohortTally, population: AnalysisPopulation): CohortCounts {
  const all = population === 'all_enrolled';
  return {
    enrolled: tally.enrolled,
    counted: all ? tally.enrolled : tally.evaluable,
    evaluable: tally.evaluable,
    pending: tally.pending,
    responders: tally.responders,
    stage1Counted: all ? tally.stage1Enrolled : tally.stage1Evaluable,
    stage1Pending: tally.stage1Pending,
    stage1Responders: tally.stage1Responders,
    windowCounted: all ? tally.windowEnrolled : tally.windowEvaluable,
    lastWeekEnrolled: tally.lastWeekEnrolled,
  };
}

export type TargetProjection = Projection & { target: 'n1' | 'n' };

export type CohortProjections = {
  window: (RateWindow & { enrolled: number }) | null;
  months: Array<{ month: string; enrolled: number; daysOpen: number }>;
  targets: TargetProjection[];
  notes: string[];
};

const CLOSED = new Set(['stopped', 'completed']);

/** Projected dates of reaching n1 and n for one cohort, with the window and range they rest on. */
export function projectCohort(input: {
  cohort: Pick<Cohort, 'status'>;
  design: Pick<LockedDesign, 'n1' | 'n' | 'analysisPopulation' | 'interimAccrual'> | undefined;
  tally: CohortTally;
  months: MonthCount[];
  today: string;
}): CohortProjections {
  const { cohort, design, tally, today } = input;
  if (!design) return { window: null, months: [], targets: [], notes: ['No design is locked yet, so there is no n1 or n to project.'] };
  if (CLOSED.has(cohort.status)) return { window: null, months: [], targets: [], notes: [`The cohort is ${STATUS_IN_A_SENTENCE[cohort.status]}: nothing left to project.`] };
  const evaluableOnly = design.analysisPopulation === 'evaluable';
  const counts = countsUnder(tally, design.analysisPopulation);
  const window = rateWindow(today, tally.firstEnrolledOn);
  const byMonth = new Map(input.months.map((m) => [m.month, evaluableOnly ? m.evaluable : m.enrolled]));
  const first = tally.firstEnrolledOn;
  const months = rangeMonths(today, first).map((month) => ({ month, enrolled: byMonth.get(month) ?? 0, daysOpen: daysOpen(month, first as string) }));
  const project = (target: 'n1' | 'n', size: number): TargetProjection => ({
    target,
    ...projectTarget({ today, counted: counts.counted, target: size, window, enrolledInWindow: counts.windowCounted, months }),
  });
  const targets = [...(design.n1 !== null ? [project('n1', design.n1)] : []), project('n', design.n)];
  const notes: string[] = [];
  if (cohort.status === 'interim_review' && design.interimAccrual === 'pause') {
    notes.push('Accrual is paused for the interim review; the dates assume it resumes at the recent rate.');
  }
  if (evaluableOnly) notes.push('The protocol counts evaluable patients only: patients found not evaluable are replaced, which moves the dates later.');
  return { window: window && { ...window, enrolled: counts.windowCounted }, months, targets, notes };
}

export type SiteRow = {
  siteId: string;
  code: string;
  name: string;
  plannedPerMonth: number | null;
  enrolled: number;
  evaluable: number;
  pendingOutcomes: number;
  lastEnrolledOn: string | null;
  daysSinceLastEnrolment: number | null;
  inactive: boolean;
  monthly: Array<Pick<SeriesPoint, 'period' | 'cumulative' | 'planned'>>;
};

export type InactivityWarning = {
  siteId: string;
  siteCode: string;
  siteName: string;
  weeks: number;
  lastEnrolledOn: string | null;
  text: string;
};

/** A site warns when its last enrolment (or its opening, if it never enrolled) is at least `weeks` weeks old. */
export function inactivityWarning(site: SiteTally, trialStart: string | null, weeks: number, today: string): InactivityWarning | null {
  const opened = [trialStart, site.joinedOn].filter((d): d is string => !!d).sort().at(-1) ?? null;
  const since = site.lastEnrolledOn ?? opened;
  if (!since) return null;
  const days = daysBetween(since, today);
  if (days < weeks * 7) return null;
  const idle = Math.floor(days / 7);
  const text = site.lastEnrolledOn
    ? `${site.code} has enrolled nobody for ${idle} weeks (last enrolment ${site.lastEnrolledOn}).`
    : `${site.code} has enrolled nobody in the ${idle} weeks since it opened (${since}).`;
  return { siteId: site.siteId, siteCode: site.code, siteName: site.name, weeks: idle, lastEnrolledOn: site.lastEnrolledOn, text };
}

/** Whether any cohort is taking patients now, so that an idle site is worth a warning. */
export function isEnrolling(cohorts: Cohort[], designs: Map<string, LockedDesign>): boolean {
  return cohorts.some(
    (c) =>
      c.status === 'enrolling_stage_1' ||
      c.status === 'enrolling_stage_2' ||
      (c.status === 'interim_review' && designs.get(c.id)?.interimAccrual === 'continue_at_risk'),
  );
}

/** The part of a cohort's design that accrual and the Portfolio show: its targets. */
export type DesignTargets = Pick<LockedDesign, 'selection' | 'n1' | 'n' | 'analysisPopulation'>;

export const designTargets = (design: LockedDesign | undefined): DesignTargets | null =>
  design ? { selection: design.selection, n1: design.n1, n: design.n, analysisPopulation: design.analysisPopulation } : null;

/** A cohort's enrolment counts, as Accrual and the Portfolio both show them. */
export type EnrolmentCounts = {
  enrolled: number;
  counted: number;
  evaluable: number;
  pendingOutcomes: number;
  enrolledLastWeek: number;
  lastEnrolledOn: string | null;
};

/** The enrolment counts of a cohort, from its counts under the protocol's population and its tally. */
export const enrolmentCounts = (counts: CohortCounts, tally: CohortTally): EnrolmentCounts => ({
  enrolled: counts.enrolled,
  counted: counts.counted,
  evaluable: counts.evaluable,
  pendingOutcomes: counts.pending,
  enrolledLastWeek: counts.lastWeekEnrolled,
  lastEnrolledOn: tally.lastEnrolledOn,
});

export type CohortAccrual = EnrolmentCounts & {
  cohortId: string;
  code: string;
  name: string;
  status: Cohort['status'];
  design: DesignTargets | null;
  projections: CohortProjections;
};

export type TrialAccrual = {
  trialId: string;
  trialCode: string;
  asOf: string;
  plan: { perMonth: number | null; startDate: string | null };
  inactivityWarningWeeks: number;
  sitesShown: 'all' | 'own';
  totals: { enrolled: number; evaluable: number; pendingOutcomes: number; lastEnrolledOn: string | null; daysSinceLastEnrolment: number | null };
  timeline: { monthly: SeriesPoint[]; weekly: SeriesPoint[] };
  sites: SiteRow[];
  cohorts: CohortAccrual[];
  warnings: InactivityWarning[];
};

const sum = (values: number[]) => values.reduce((a, b) => a + b, 0);

function timelineStart(trial: Trial, months: string[]): string | null {
  const firstMonth = [...months].sort()[0];
  const candidates = [trial.startDate, firstMonth ? firstOfMonth(firstMonth) : null].filter((d): d is string => !!d);
  return candidates.sort()[0] ?? null;
}

// The whole page per trial, day and data version, frozen, with the pages made from it for site staff (by the sites they see).
const accruals = new VersionedCache<{ whole: TrialAccrual; bySites: Map<string, TrialAccrual> }>(300);

/** The whole Accrual page for one trial; `sites` limits the per-site rows (site roles see their own). */
export async function trialAccrual(db: Db, trialId: string, options: { today: string; sites: string[] | 'all'; dataVersion?: number }): Promise<TrialAccrual> {
  const key = `${trialId}|${options.today}`;
  const kept =
    accruals.get(key, await currentDataVersion(db, { trialId, dataVersion: options.dataVersion })) ??
    (await inOneSnapshot(db, async (trx) => {
      const version = await trialDataVersion(trx, trialId);
      const computed = { whole: deepFreeze(await computeAccrual(trx, trialId, options.today)), bySites: new Map<string, TrialAccrual>() };
      accruals.set(key, version, computed);
      return computed;
    }));
  const shown = options.sites;
  if (shown === 'all') return kept.whole;
  const { whole } = kept;
  // Each site's row and warning stand on their own, so dropping the others leaves them as computed.
  return keptFrozen(kept.bySites, JSON.stringify([...shown].sort()), () => ({
    ...whole,
    sitesShown: 'own' as const,
    sites: whole.sites.filter((s) => shown.includes(s.siteId)),
    warnings: whole.warnings.filter((w) => shown.includes(w.siteId)),
  }));
}

async function computeAccrual(db: Knex.Transaction, trialId: string, today: string): Promise<TrialAccrual> {
  // One after another: a transaction's queries share its one connection.
  const trial = await findTrial(db, trialId);
  const settings = await findProtocolSettings(db, trialId);
  if (!trial || !settings) throw new NotFoundError('The trial');
  const cohortIds = trial.cohorts.map((c) => c.id);
  const designs = await currentDesigns(db, cohortIds);
  const tallies = await cohortTallies(db, cohortIds, today);
  const monthCounts = await recentMonthCounts(db, cohortIds, today);
  const siteRows = await siteTallies(db, trialId, today);
  const bySiteMonth = await monthlyBySite(db, trialId, today);
  const weekly = await weeklyCounts(db, trialId, today);

  const overallMonthly = new Map<string, number>();
  for (const row of bySiteMonth) overallMonthly.set(row.period, (overallMonthly.get(row.period) ?? 0) + row.enrolled);
  const from = timelineStart(trial, [...overallMonthly.keys()]);
  const plan = (perMonth: number | null): Plan | null => (perMonth && trial.startDate ? { perMonth, startDate: trial.startDate } : null);

  const enrolling = isEnrolling(trial.cohorts, designs);
  const warnings = enrolling
    ? siteRows
        .filter((s) => s.listed)
        .map((s) => inactivityWarning(s, trial.startDate, settings.inactivityWarningWeeks, today))
        .filter((w): w is InactivityWarning => w !== null)
    : [];
  const warned = new Set(warnings.map((w) => w.siteId));

  const sites: SiteRow[] = siteRows.map((site) => {
    const counts = new Map(bySiteMonth.filter((r) => r.siteId === site.siteId).map((r) => [r.period, r.enrolled]));
    return {
      siteId: site.siteId,
      code: site.code,
      name: site.name,
      plannedPerMonth: site.plannedPerMonth,
      enrolled: site.enrolled,
      evaluable: site.evaluable,
      pendingOutcomes: site.pending,
      lastEnrolledOn: site.lastEnrolledOn,
      daysSinceLastEnrolment: site.lastEnrolledOn ? daysBetween(site.lastEnrolledOn, today) : null,
      inactive: warned.has(site.siteId),
      monthly: cumulativeSeries({ granularity: 'month', from, today, counts, plan: plan(site.plannedPerMonth) }).map(({ period, cumulative, planned }) => ({
        period,
        cumulative,
        planned,
      })),
    };
  });

  const cohorts: CohortAccrual[] = trial.cohorts.map((cohort) => {
    const design = designs.get(cohort.id);
    const tally = tallies.get(cohort.id) ?? emptyTally(cohort.id);
    const counts = countsUnder(tally, design?.analysisPopulation ?? 'all_enrolled');
    return {
      cohortId: cohort.id,
      code: cohort.code,
      name: cohort.name,
      status: cohort.status,
      design: designTargets(design),
      ...enrolmentCounts(counts, tally),
      projections: projectCohort({ cohort, design, tally, months: monthCounts.filter((m) => m.cohortId === cohort.id), today }),
    };
  });

  const lastEnrolledOn = siteRows.map((s) => s.lastEnrolledOn).filter((d): d is string => !!d).sort().at(-1) ?? null;
  return {
    trialId,
    trialCode: trial.code,
    asOf: today,
    plan: { perMonth: trial.plannedAccrualPerMonth, startDate: trial.startDate },
    inactivityWarningWeeks: settings.inactivityWarningWeeks,
    sitesShown: 'all',
    totals: {
      enrolled: sum(siteRows.map((s) => s.enrolled)),
      evaluable: sum(siteRows.map((s) => s.evaluable)),
      pendingOutcomes: sum(siteRows.map((s) => s.pending)),
      lastEnrolledOn,
      daysSinceLastEnrolment: lastEnrolledOn ? daysBetween(lastEnrolledOn, today) : null,
    },
    timeline: {
      monthly: cumulativeSeries({ granularity: 'month', from, today, counts: overallMonthly, plan: plan(trial.plannedAccrualPerMonth) }),
      weekly: cumulativeSeries({ granularity: 'week', from, today, counts: weekly, plan: plan(trial.plannedAccrualPerMonth) }),
    },
    sites,
    cohorts,
    warnings,
  };
}

/** The Accrual page as the actor sees it: operational figures only; site staff get their own sites' rows. */
export async function accrualFor(db: Db, actor: Actor, today: string): Promise<TrialAccrual> {
  return trialAccrual(db, actor.access.trialId, { today, sites: operationalSites(actor.access), dataVersion: actor.access.dataVersion });
}
