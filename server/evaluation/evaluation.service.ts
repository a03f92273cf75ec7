/**
 * The live evaluation of every cohort of a trial: counts under the protocol's analysis population,
 * the response rate with its exact (Clopper–Pearson) interval, the exact one-sided binomial test
 * against p0, and where the cohort stands against its locked design's rules (including early
 * determination). Aggregate figures only. `evaluateTrial` computes everything; `evaluationFor`
 * projects it for the viewer by the visibility rule (server/auth/visibility.ts): live figures, the
 * released cut's figures, own sites' counts. Numbers come straight from the statistics engine, so
 * they match it by construction.
 */
import type { Db } from '../db/knex.js';
import { NotFoundError } from '../http/errors.js';
import type { TrialAccess } from '../auth/access.js';
import { efficacyView, projectEfficacy, type Projected } from '../auth/visibility.js';
import { binomialTest, evaluateTwoStage, proportionInterval, type InterimStatus } from '../stats/index.js';
import { currentDesigns, type LockedDesign } from '../designs/index.js';
import { trialFacts } from '../trials/index.js';
import { countingGroups, responderPaths, siteCounts, type CountingGroup, type CountingRule, type SiteCounts } from './evaluation.repository.js';
import { latestReleased, type ReleasedFigures } from './released.repository.js';
import { CAUTIONS } from '../words/index.js';
import { countsToward, tally, type CountablePatient, type StageTally, type Tally } from './counting.js';

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
  status: string;
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
  rule: (InterimStatus & { basis: { responders: number; evaluable: number; stage1Responders?: number } }) | null;
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

/** Where the cohort stands against its rules: stage 1 until all n1 stage-1 outcomes are in, then the final rule. */
export function ruleState(design: Pick<LockedDesign, 'r1' | 'n1' | 'r' | 'n' | 'analysisPopulation'>, patients: CountablePatient[]) {
  const counting = [...patients].filter((p) => countsToward(p, design.analysisPopulation)).sort((a, b) => a.enrolmentSeq - b.enrolmentSeq);
  return ruleFromTally(design, counting.length, tally(counting.slice(0, design.n), design.n1, design.analysisPopulation));
}

/**
 * The rule state from `used`, the tally of the first n counting patients in enrolment order (all of
 * them when no more than n count), and `counting`, how many patients count in all.
 */
export function ruleFromTally(design: Pick<LockedDesign, 'r1' | 'n1' | 'r' | 'n' | 'analysisPopulation'>, counting: number, used: Tally) {
  const notes: string[] = [];
  if (counting > design.n) {
    notes.push(`${counting} patients count, more than the design's n = ${design.n}: the rule is applied to the first ${design.n} in enrolment order.`);
  }
  const t = used;
  const twoStage = design.r1 !== null && design.n1 !== null;
  const rule = { r1: design.r1 ?? undefined, n1: design.n1 ?? undefined, r: design.r, n: design.n };
  let basis: { responders: number; evaluable: number; stage1Responders?: number };
  if (twoStage && t.stage1.decided < (design.n1 as number)) basis = { responders: t.stage1.responders, evaluable: t.stage1.decided };
  else if (twoStage) basis = { responders: t.responders, evaluable: t.decided, stage1Responders: t.stage1.responders };
  else basis = { responders: t.responders, evaluable: t.decided };
  if (twoStage && t.stage1.decided < (design.n1 as number) && t.stage2.decided > 0) {
    notes.push(`${t.stage2.decided} stage-2 outcomes are in while ${(design.n1 as number) - t.stage1.decided} stage-1 outcomes are still missing; the stage-1 rule is applied first.`);
  }
  return { rule: { ...evaluateTwoStage(rule, basis), basis }, notes };
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

function earlyDetermination(design: LockedDesign, rule: InterimStatus): { early: string | null; accrual: string | null } {
  if (!rule.determinedEarly) return { early: null, accrual: null };
  if (rule.stage === 'stage1' && rule.decision === 'continue' && design.n1 !== null && design.r1 !== null) {
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

/** Every cohort's live evaluation, all of it; `siteIds` asks for those sites' counts too. */
export async function evaluateTrial(db: Db, trialId: string, options: { siteIds?: readonly string[] } = {}): Promise<TrialEvaluation> {
  const facts = await trialFacts(db, trialId);
  if (!facts) throw new NotFoundError('The trial');
  const cohortIds = facts.cohorts.map((c) => c.id);
  const designs = await currentDesigns(db, cohortIds);
  const rules: CountingRule[] = cohortIds.map((cohortId) => {
    const design = designs.get(cohortId);
    return { cohortId, population: design?.analysisPopulation ?? 'all_enrolled', n1: design?.n1 ?? null, n: design?.n ?? null };
  });
  const [groups, points, sites] = await Promise.all([countingGroups(db, rules), responderPaths(db, rules, PATH_POINTS), siteCounts(db, rules, options.siteIds ?? [])]);
  const cohorts = facts.cohorts.map((cohort): CohortEvaluation => {
    const design = designs.get(cohort.id);
    const mine = groups.filter((g) => g.cohortId === cohort.id);
    const t = tallyOfGroups(mine);
    const notes: string[] = [];
    let rule: CohortEvaluation['rule'] = null;
    let early: string | null = null;
    let accrual: string | null = null;
    if (design) {
      const state = ruleFromTally(design, t.counted, tallyOfGroups(mine.filter((g) => g.withinN)));
      rule = state.rule;
      notes.push(...state.notes);
      ({ early, accrual } = earlyDetermination(design, state.rule));
    } else {
      notes.push('No locked design yet: the rule state appears once the statistician locks the design.');
    }
    if (t.pending > 0) notes.push(`${t.pending} outcomes are pending and not in the figures yet.`);
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

/** The live evaluation as this viewer may see it: everything computed, then projected cohort by cohort. */
export async function evaluationFor(db: Db, access: TrialAccess): Promise<VisibleEvaluation> {
  const evaluation = await evaluateTrial(db, access.trialId, { siteIds: access.siteIds });
  const released = await latestReleased(db, evaluation.cohorts.map((c) => c.cohortId));
  return {
    ...evaluation,
    cohorts: evaluation.cohorts.map(({ sites, ...cohort }) => {
      const figures = released.get(cohort.cohortId) ?? null;
      const view = efficacyView(access, { sponsorSeesResponse: cohort.design?.sponsorSeesResponse ?? false, released: figures !== null });
      return projectEfficacy(view, cohort, LIVE_EFFICACY_KEYS, { released: figures, sites });
    }),
  };
}
