/**
 * The live evaluation of every cohort of a trial: counts under the protocol's analysis population,
 * the response rate with its exact (Clopper–Pearson) interval, the exact one-sided binomial test
 * against p0, and the cohort's verdict under its locked design (verdict.ts: the same computation a
 * data cut uses, at the look the cohort's status puts it at, with early determination). Aggregate
 * figures only. `evaluateTrial` computes everything; `evaluationFor` projects it for the viewer by
 * the visibility rule (server/auth/visibility.ts): live figures, the released cut's figures, own
 * sites' counts. Numbers come straight from the statistics engine, so they match it by construction.
 * The whole evaluation is computed once per data version of the trial (server/db/trial-versions.ts)
 * and kept in memory; the projection runs on every request, so the visibility rule decides each time.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { currentDataVersion, inOneSnapshot, keptFrozen, trialDataVersion, VersionedCache } from '../db/trial-versions.js';
import { NotFoundError } from '../http/errors.js';
import type { TrialAccess } from '../auth/access.js';
import { efficacyView, projectEfficacy, type Projected } from '../auth/visibility.js';
import { binomialTest, proportionInterval } from '../stats/index.js';
import { currentDesigns, type LockedDesign } from '../designs/index.js';
import { trialFacts, type CohortStatus } from '../trials/index.js';
import { countingGroups, responderPaths, siteCounts, type CountingGroup, type CountingRule, type SiteCounts } from './evaluation.repository.js';
import { latestReleased, type ReleasedFigures } from './released.repository.js';
import { CAUTIONS, plural } from '../words/index.js';
import { tally, type CountablePatient, type StageTally, type Tally } from './counting.js';
import { describeVerdict, verdictFigures, verdictLook, type CohortVerdict } from './verdict.js';

export const CONF_LEVEL = 0.95;

/** The chart's path is thinned to about this many points: a line of thousands of points draws no better and weighs far more. */
export const PATH_POINTS = 500;

export type DesignSummary = Pick<
  LockedDesign,
  'version' | 'selection' | 'p0' | 'p1' | 'alpha' | 'beta' | 'r1' | 'n1' | 'r' | 'n' | 'analysisPopulation' | 'interimAccrual' | 'sponsorSeesResponse' | 'typeIError' | 'power'
>;

export type CohortEvaluation = {
  cohortId: string;
  cohortCode: string;
  cohortName: string;
  status: CohortStatus;
  design: DesignSummary | null;
  enrolled: number;
  counted: number;
  decided: number;
  pending: number;
  notEvaluable: number;
  responders: number;
  stage1: StageTally;
  stage2: StageTally;
  rate: { estimate: number; ci: [number, number]; confLevel: number; method: 'clopper-pearson' } | null;
  test: { x: number; n: number; p0: number; pValue: number; alternative: 'greater' } | null;
  /** The verdict under the locked design at the look the cohort's status puts it at. */
  rule: CohortVerdict | null;
  earlyDetermination: string | null;
  accrual: string | null;
  notes: string[];
  /**
   * Responders against patients with an outcome, in enrolment order: the path the chart draws,
   * thinned to about PATH_POINTS evenly spaced points; the first and the last are always exact.
   */
  path: Array<{ evaluable: number; responders: number }>;
  /** Live counts at the sites asked for (a viewer's own sites). */
  sites: SiteCounts[];
};

function summary(d: LockedDesign): DesignSummary {
  return {
    version: d.version,
    selection: d.selection,
    p0: d.p0,
    p1: d.p1,
    alpha: d.alpha,
    beta: d.beta,
    r1: d.r1,
    n1: d.n1,
    r: d.r,
    n: d.n,
    analysisPopulation: d.analysisPopulation,
    interimAccrual: d.interimAccrual,
    sponsorSeesResponse: d.sponsorSeesResponse,
    typeIError: d.typeIError,
    power: d.power,
  };
}

type RuleDesign = Pick<LockedDesign, 'r1' | 'n1' | 'r' | 'n' | 'p0' | 'alpha' | 'analysisPopulation'>;

/** The verdict from the cohort's patients one by one: the reference the grouped counts of the live evaluation are checked against. */
export function ruleState(design: RuleDesign, status: CohortStatus, patients: CountablePatient[]): CohortVerdict {
  return describeVerdict(verdictFigures(design, tally(patients, design.n1, design.analysisPopulation), verdictLook(status)), design);
}

/** The tally of the patients in `groups` (one cohort's), from the grouped counts. */
function tallyOfGroups(groups: CountingGroup[]): Tally {
  const empty = (): StageTally => ({ counted: 0, decided: 0, responders: 0, pending: 0 });
  const total = empty();
  const byStage = { 1: empty(), 2: empty() };
  let enrolled = 0;
  let notEvaluable = 0;
  for (const g of groups) {
    enrolled += g.patients;
    if (!g.evaluable) notEvaluable += g.patients;
    if (!g.counts) continue;
    for (const bucket of [total, byStage[g.stage]]) {
      bucket.counted += g.patients;
      if (g.outcome === 'pending') bucket.pending += g.patients;
      else bucket.decided += g.patients;
      if (g.outcome === 'responder') bucket.responders += g.patients;
    }
  }
  return { ...total, enrolled, notEvaluable, stage1: byStage[1], stage2: byStage[2] };
}

function earlyDetermination(design: LockedDesign, rule: CohortVerdict): { early: string | null; accrual: string | null } {
  if (!rule.determinedEarly) return { early: null, accrual: null };
  if (rule.applied === 'stage1' && rule.decision === 'continue' && design.n1 !== null && design.r1 !== null) {
    return {
      early: `Stage 1 is settled early: r1 + 1 = ${design.r1 + 1} responders were reached before n1 = ${design.n1} patients were evaluated, so the futility rule can no longer be met.`,
      accrual:
        design.interimAccrual === 'continue_at_risk'
          ? 'The protocol lets accrual continue at risk: enrolment goes on without a pause.'
          : `The protocol pauses accrual for the interim review: the cohort still pauses at n1 = ${design.n1}, because the committee reviews the interim.`,
    };
  }
  return { early: rule.message, accrual: null };
}

export type TrialEvaluation = { trialId: string; confLevel: number; cautions: string[]; cohorts: CohortEvaluation[] };

/** `views`: the evaluation as each kind of viewer sees it (by roles and sites), made once per data version and frozen. */
type Computed = { evaluation: TrialEvaluation; released: Map<string, ReleasedFigures>; views: Map<string, VisibleEvaluation> };

// A few hundred trials' evaluations are a few megabytes at most.
const evaluations = new VersionedCache<Computed>(300);

/** The evaluation with each cohort's released figures, computed once per data version of the trial. */
async function computed(db: Db, access: { trialId: string; dataVersion?: number }): Promise<Computed> {
  const { trialId } = access;
  const cached = evaluations.get(trialId, await currentDataVersion(db, access));
  if (cached) return cached;
  return inOneSnapshot(db, async (trx) => {
    const version = await trialDataVersion(trx, trialId);
    const evaluation = await computeEvaluation(trx, trialId);
    const value = { evaluation, released: await latestReleased(trx, evaluation.cohorts.map((c) => c.cohortId)), views: new Map<string, VisibleEvaluation>() };
    evaluations.set(trialId, version, value);
    return value;
  });
}

/** Every cohort's live evaluation, all of it, with every site's counts. */
export async function evaluateTrial(db: Db, trialId: string): Promise<TrialEvaluation> {
  return (await computed(db, { trialId })).evaluation;
}

async function computeEvaluation(db: Knex.Transaction, trialId: string): Promise<TrialEvaluation> {
  const facts = await trialFacts(db, trialId);
  if (!facts) throw new NotFoundError('The trial');
  const cohortIds = facts.cohorts.map((c) => c.id);
  const designs = await currentDesigns(db, cohortIds);
  const rules: CountingRule[] = cohortIds.map((cohortId) => {
    const design = designs.get(cohortId);
    return { cohortId, population: design?.analysisPopulation ?? 'all_enrolled', n1: design?.n1 ?? null };
  });
  // One after another: a transaction's queries share its one connection.
  const groups = await countingGroups(db, rules);
  const points = await responderPaths(db, rules, PATH_POINTS);
  const sites = await siteCounts(db, rules, facts.sites.map((site) => site.id));
  const cohorts = facts.cohorts.map((cohort): CohortEvaluation => {
    const design = designs.get(cohort.id);
    const mine = groups.filter((g) => g.cohortId === cohort.id);
    const t = tallyOfGroups(mine);
    const notes: string[] = [];
    let rule: CohortEvaluation['rule'] = null;
    let early: string | null = null;
    let accrual: string | null = null;
    if (design) {
      rule = describeVerdict(verdictFigures(design, t, verdictLook(cohort.status)), design);
      ({ early, accrual } = earlyDetermination(design, rule));
    } else {
      notes.push('No locked design yet: the rule state appears once the statistician locks the design.');
    }
    if (t.pending > 0) notes.push(`${plural(t.pending, 'outcome')} pending, not in the figures yet.`);
    const path = points.filter((p) => p.cohortId === cohort.id).map((p) => ({ evaluable: p.evaluable, responders: p.responders }));
    const decided = t.decided;
    return {
      cohortId: cohort.id,
      cohortCode: cohort.code,
      cohortName: cohort.name,
      status: cohort.status,
      design: design ? summary(design) : null,
      enrolled: t.enrolled,
      counted: t.counted,
      decided,
      pending: t.pending,
      responders: t.responders,
      notEvaluable: t.notEvaluable,
      stage1: t.stage1,
      stage2: t.stage2,
      rate:
        decided > 0
          ? { estimate: t.responders / decided, ci: proportionInterval(t.responders, decided, { method: 'clopper-pearson', confLevel: CONF_LEVEL }), confLevel: CONF_LEVEL, method: 'clopper-pearson' }
          : null,
      test:
        decided > 0 && design
          ? { x: t.responders, n: decided, p0: design.p0, pValue: binomialTest(t.responders, decided, design.p0, { alternative: 'greater' }).pValue, alternative: 'greater' }
          : null,
      rule,
      earlyDetermination: early,
      accrual,
      notes,
      path,
      sites: sites.filter((s) => s.cohortId === cohort.id),
    };
  });
  return { trialId, confLevel: CONF_LEVEL, cautions: [...CAUTIONS], cohorts };
}

/**
 * Keys of a cohort's evaluation that carry live efficacy: responders (also inside the stage
 * tallies), the rate and its interval, the test, the rule's verdict with the notes and accrual
 * words that follow from it, and the responders path. Enrolled, counted, decided, pending and not
 * evaluable are operational.
 */
export const LIVE_EFFICACY_KEYS = ['responders', 'stage1', 'stage2', 'rate', 'test', 'rule', 'earlyDetermination', 'accrual', 'notes', 'path'] as const;

export type VisibleCohortEvaluation = Projected<Omit<CohortEvaluation, 'sites'>, (typeof LIVE_EFFICACY_KEYS)[number], ReleasedFigures, SiteCounts>;
export type VisibleEvaluation = Omit<TrialEvaluation, 'cohorts'> & { cohorts: VisibleCohortEvaluation[] };

/**
 * The live evaluation as this viewer may see it: everything computed, then projected cohort by
 * cohort. The projection depends only on the viewer's roles and sites, so it is made once per data
 * version for each such viewer and shared, frozen.
 */
export async function evaluationFor(db: Db, access: TrialAccess): Promise<VisibleEvaluation> {
  const { evaluation, released, views } = await computed(db, access);
  const viewer = JSON.stringify([[...access.roles].sort(), [...access.siteIds].sort()]);
  return keptFrozen(views, viewer, () => projectEvaluation(evaluation, released, access));
}

function projectEvaluation(evaluation: TrialEvaluation, released: Map<string, ReleasedFigures>, access: TrialAccess): VisibleEvaluation {
  return {
    ...evaluation,
    cohorts: evaluation.cohorts.map(({ sites, ...cohort }) => {
      const figures = released.get(cohort.cohortId) ?? null;
      const view = efficacyView(access, { sponsorSeesResponse: cohort.design?.sponsorSeesResponse ?? false, released: figures !== null });
      return projectEfficacy(view, cohort, LIVE_EFFICACY_KEYS, { released: figures, sites: sites.filter((site) => access.siteIds.includes(site.siteId)) });
    }),
  };
}
