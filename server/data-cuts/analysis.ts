/**
 * The analysis of a data cut, computed from its frozen snapshot only (never from live patients), so
 * the same cut always gives the same figures. Counting follows the protocol's analysis population
 * (server/evaluation/counting.ts); every number comes from the statistics engine (server/stats).
 * Compute, then describe: `cohortFigures` returns numbers and states only, `describeCohort` turns
 * them into the notes and cautions a person reads. Pure: no database, no I/O — the report, the API
 * and the tests all call `analyseCut`.
 *
 * The verdict is the live evaluation's computation (server/evaluation/verdict.ts, rules in
 * server/stats/verdict.ts), at the look the cut's kind and the cohort's status at the cut give; the
 * inference, the final-size deviation, the predictive probability and the multiplicity adjustment
 * follow from it, so the page cannot disagree with itself. `rulesStatement` carries the rules to the
 * reader (the report prints them).
 */
import {
  assignStages,
  countsToward,
  describeVerdict,
  effectiveOutcome,
  responderPath,
  tally,
  verdictFigures,
  verdictLook,
  type CohortVerdict,
  type CountablePatient,
  type Tally,
} from '../evaluation/index.js';
import {
  StatsInputError,
  adjustPValues,
  binomialTest,
  heterogeneity,
  operatingCharacteristics,
  posteriorProbability,
  predictiveProbability,
  proportionInterval,
  twoStageInference,
  type DesignRule,
  type FinalTest,
  type HeterogeneityResult,
  type TwoStageInference,
  type Verdict,
} from '../stats/index.js';
import { CAUTIONS, VERDICT_METHODS, VERDICT_RULES, plural } from '../words/index.js';
import type { CutCohort, CutDesign, CutPatient, CutSnapshot, DataCut } from './data-cuts.repository.js';
import type { CutKind } from './data-cuts.schema.js';
import type { CutAdverseEvent } from './cut-adverse-events.repository.js';
import { cohortSafety, type CohortSafetyAnalysis } from './safety-analysis.js';

export const CONF_LEVEL = 0.95;

export type PriorSetting = { a: number | null; b: number | null; thetaT: number };

export type AnalysisInput = {
  cut: { id: string; seq: number; kind: CutKind; cutAt: string; contentHash: string; cohortId: string | null };
  snapshot: CutSnapshot;
  patients: CutPatient[];
  /** The cut's frozen adverse events (none for cuts frozen before safety monitoring). */
  adverseEvents?: CutAdverseEvent[];
  prior: PriorSetting;
  /** Where the prior came from: the cut's saved setting or this request's query. */
  priorSource: 'saved' | 'request';
};

type Interval = [number, number];

export type OperatingSummary = { typeIError: number; power: number; pet0: number | null; en0: number };

/** A final look at sizes other than planned: the thresholds the verdict uses there, with their operating characteristics. */
export type Deviation = {
  plannedN1: number | null;
  plannedN: number;
  attainedN1: number | null;
  attainedN: number;
  applied: { r1: number | null; r: number; characteristics: OperatingSummary | null; note: string | null };
  method: string;
};

export type SiteRow = {
  siteId: string;
  siteCode: string;
  enrolled: number;
  decided: number;
  responders: number;
  estimate: number | null;
  ci: Interval | null;
};

export type BoundaryPoint = { evaluable: number; futility: number | null; success: number };

export type CohortAnalysis = {
  cohortId: string;
  code: string;
  name: string;
  statusAtCut: string;
  design: CutDesign | null;
  counts: Tally | null;
  responseRate: {
    responders: number;
    decided: number;
    estimate: number;
    confLevel: number;
    clopperPearson: Interval;
    wilson: Interval;
    jeffreys: Interval;
  } | null;
  exactTest: { pValue: number; oneSidedLower: number; alternative: 'greater'; p0: number } | null;
  rule: CohortVerdict | null;
  inference:
    | (TwoStageInference & {
        x1: number;
        n1: number;
        x2: number | null;
        n2Actual: number;
        confLevel: number;
        /** Koyama & Chen §4 beside the primary p-value where stage 2 differs from the plan. */
        sensitivity: FinalTest['sensitivity'];
        note: string;
      })
    | null;
  inferenceNote: string | null;
  bayes: {
    prior: { a: number; b: number; source: 'default' | 'saved' | 'request' };
    thetaT: number;
    nmax: number;
    posteriorProbability: number;
    predictiveProbability: number;
    statement: string;
  } | null;
  sites: SiteRow[];
  heterogeneity: (HeterogeneityResult & { sites: number }) | null;
  heterogeneityNote: string | null;
  deviation: Deviation | null;
  responderSources: { derived: number; entered: number };
  boundaries: BoundaryPoint[];
  path: Array<{ evaluable: number; responders: number }>;
  cautions: string[];
};

export type OpenIssue = {
  studyId: string;
  siteCode: string;
  cohortCode: string;
  issue: 'pending_outcome' | 'unattested_outcome' | 'outcome_flag' | 'not_evaluable';
  detail: string;
};

export type Multiplicity = {
  method: string;
  /** Each cohort's p-value: stage-wise for a two-stage cohort at its final analysis, the exact binomial one otherwise. */
  rows: Array<{ cohortId: string; code: string; p0: number; basis: FinalTest['method']; pValue: number; holm: number; bh: number }>;
};

export type Analysis = {
  cut: AnalysisInput['cut'];
  trial: CutSnapshot['trial'];
  confLevel: number;
  prior: { a: number | null; b: number | null; thetaT: number; source: 'default' | 'saved' | 'request'; statement: string };
  cohorts: CohortAnalysis[];
  multiplicity: Multiplicity | null;
  openIssues: OpenIssue[];
  cautions: string[];
  methods: Record<string, string>;
  /** How verdicts are reached, for the reader (the report prints it). */
  rulesStatement: string[];
  /** Per cohort: adverse events, toxicities against the locked definition, the safety rule and the joint verdict. */
  safety: CohortSafetyAnalysis[];
};

/** A final-size deviation in numbers. */
type DeviationFigures = Omit<Deviation, 'applied' | 'method'> & {
  applied: { r1: number | null; r: number; characteristics: OperatingSummary | null; failure: string | null };
};

type InferenceResult = TwoStageInference & { x1: number; n1: number; x2: number | null; n2Actual: number; confLevel: number; sensitivity: FinalTest['sensitivity'] };

/** The stage-wise inference of a final cut, or why there is none. */
type InferenceFigures =
  | { state: 'not-applicable' }
  | { state: 'no-stage-1' }
  | { state: 'failed'; message: string }
  | {
      state: 'computed';
      result: InferenceResult;
      pending: number;
      stage1: { actual: number; planned: number };
      /** Stage 1 met the futility rule: these stage-2 outcomes are left out. */
      stage2LeftOut: number;
      /** The actual and planned stage-2 sizes when stage 2 was reached. */
      stage2: { actual: number; planned: number } | null;
    };

type BayesFigures = {
  prior: { a: number; b: number; source: 'default' | 'saved' | 'request' };
  thetaT: number;
  nmax: number;
  posteriorProbability: number;
  predictiveProbability: number;
};

/** One cohort at the cut in numbers and states; `describeCohort` words them. */
type CohortFigures = {
  cohort: CutCohort;
  design: CutDesign;
  counts: Tally;
  responseRate: CohortAnalysis['responseRate'];
  exactTest: CohortAnalysis['exactTest'];
  rule: Verdict;
  inference: InferenceFigures;
  bayes: BayesFigures;
  sites: SiteRow[];
  heterogeneity: CohortAnalysis['heterogeneity'];
  /** Why there is no exact heterogeneity p-value, or no comparison at all. */
  heterogeneityGap: 'exact-too-large' | 'fewer-than-two-sites' | null;
  deviation: DeviationFigures | null;
  responderSources: CohortAnalysis['responderSources'];
  boundaries: BoundaryPoint[];
  path: CohortAnalysis['path'];
};

const METHODS: Record<string, string> = {
  responseRate:
    'Response rate among patients with a decided outcome under the protocol’s analysis population (all enrolled: a patient who is not evaluable counts as a non-responder; evaluable: such patients are left out). Pending outcomes are left out. Intervals: Clopper–Pearson (exact), Wilson score and Jeffreys, two-sided 95%.',
  exactTest: 'Exact one-sided binomial test of H0: p ≤ p0 against p > p0, with the matching one-sided 95% lower limit.',
  rule: VERDICT_METHODS.rule,
  inference: VERDICT_METHODS.inference,
  bayes: VERDICT_METHODS.bayes,
  sites: 'Response by site with exact (Clopper–Pearson) 95% intervals; heterogeneity by Pearson chi-square and the exact Fisher / Freeman–Halton test over sites with decided outcomes.',
  multiplicity: VERDICT_METHODS.multiplicity,
  deviation: VERDICT_METHODS.deviation,
};

function characteristics(rule: DesignRule, p0: number, p1: number): OperatingSummary {
  const [atP0, atP1] = operatingCharacteristics(rule, [p0, p1]);
  return { typeIError: atP0.probPromising, power: atP1.probPromising, pet0: rule.r1 === undefined ? null : atP0.pet, en0: atP0.expectedN };
}

/** The final-size deviation of a verdict reached at sizes other than planned; none under the stage-1 rule (a cohort stopped at stage 1). */
function deviationOf(design: CutDesign, verdict: Verdict): DeviationFigures | null {
  if (verdict.applied !== 'final' || verdict.threshold.source === 'planned' || !verdict.attained) return null;
  const { n1, n } = verdict.attained;
  const r = verdict.threshold.r;
  const rule: DesignRule = design.r1 !== null && n1 !== null ? { r1: design.r1, n1, r, n } : { r, n };
  let oc: OperatingSummary | null = null;
  let failure: string | null = null;
  try {
    oc = characteristics(rule, design.p0, design.p1);
  } catch (error) {
    if (!(error instanceof StatsInputError)) throw error;
    failure = error.message;
  }
  return { plannedN1: design.n1, plannedN: design.n, attainedN1: n1, attainedN: n, applied: { r1: design.r1, r, characteristics: oc, failure } };
}

function inferenceOf(design: CutDesign, t: Tally, finalTest: FinalTest | null): InferenceFigures {
  if (design.r1 === null || design.n1 === null) return { state: 'not-applicable' };
  const { stage1, stage2 } = t;
  if (stage1.decided === 0) return { state: 'no-stage-1' };
  const x1 = stage1.responders;
  const n1 = stage1.decided;
  const stopped = x1 <= design.r1;
  const n2Actual = stopped ? 0 : stage2.decided;
  try {
    const result = twoStageInference(
      { r1: design.r1, n1, r: design.r, n: Math.max(design.n, n1 + 1), p0: design.p0 },
      stopped ? { x1, confLevel: CONF_LEVEL } : { x1, x2: stage2.responders, n2Actual, confLevel: CONF_LEVEL },
    );
    return {
      state: 'computed',
      result: { ...result, x1, n1, x2: stopped ? null : stage2.responders, n2Actual, confLevel: CONF_LEVEL, sensitivity: finalTest?.sensitivity ?? null },
      pending: stage1.pending + stage2.pending,
      stage1: { actual: n1, planned: design.n1 },
      stage2LeftOut: stopped ? stage2.decided : 0,
      stage2: stopped ? null : { actual: n2Actual, planned: design.n - design.n1 },
    };
  } catch (error) {
    if (!(error instanceof StatsInputError)) throw error;
    return { state: 'failed', message: error.message };
  }
}

function boundariesOf(design: CutDesign): BoundaryPoint[] {
  const points: BoundaryPoint[] = [];
  const twoStage = design.r1 !== null && design.n1 !== null;
  for (let k = 1; k <= design.n; k++) {
    if (twoStage && k <= (design.n1 as number)) {
      const futility = (design.r1 as number) - ((design.n1 as number) - k);
      points.push({ evaluable: k, futility: futility >= 0 ? futility : null, success: (design.r1 as number) + 1 });
    } else {
      const futility = design.r - (design.n - k);
      points.push({ evaluable: k, futility: futility >= 0 ? futility : null, success: design.r + 1 });
    }
  }
  return points;
}

function sitesOf(patients: CutPatient[], population: CutDesign['analysisPopulation']): SiteRow[] {
  const bySite = new Map<string, SiteRow>();
  for (const p of patients) {
    const row = bySite.get(p.siteId) ?? { siteId: p.siteId, siteCode: p.siteCode, enrolled: 0, decided: 0, responders: 0, estimate: null, ci: null };
    row.enrolled += 1;
    const countable = toCountable(p);
    if (countsToward(countable, population)) {
      const outcome = effectiveOutcome(countable, population);
      if (outcome !== 'pending') row.decided += 1;
      if (outcome === 'responder') row.responders += 1;
    }
    bySite.set(p.siteId, row);
  }
  return [...bySite.values()]
    .map((row) =>
      row.decided > 0
        ? { ...row, estimate: row.responders / row.decided, ci: proportionInterval(row.responders, row.decided, { confLevel: CONF_LEVEL }) }
        : row,
    )
    .sort((a, b) => (a.siteCode < b.siteCode ? -1 : 1));
}

const toCountable = (p: CutPatient): CountablePatient => ({ id: p.patientId, enrolmentSeq: p.enrolmentSeq, outcome: p.outcome, evaluable: p.evaluable });

function resolvePrior(prior: PriorSetting, p0: number, source: AnalysisInput['priorSource']): { a: number; b: number; source: 'default' | 'saved' | 'request' } {
  if (prior.a !== null && prior.b !== null) return { a: prior.a, b: prior.b, source };
  return { a: p0, b: 1 - p0, source: 'default' };
}

/** Responders among counting patients with a decided outcome, by where the outcome came from. */
function responderSourcesOf(patients: CutPatient[], population: CutDesign['analysisPopulation']): CohortAnalysis['responderSources'] {
  const responders = patients.filter((p) => countsToward(toCountable(p), population) && effectiveOutcome(toCountable(p), population) === 'responder');
  const derived = responders.filter((p) => p.derivedResponder !== null).length;
  return { derived, entered: responders.length - derived };
}

/** A cohort's tally and verdict at the cut, at the look the cut's kind and the cohort's status give. */
function verdictAtCut(cohort: CutCohort, design: CutDesign, countable: CountablePatient[], kind: CutKind) {
  const t = tally(countable, design.n1, design.analysisPopulation);
  const look = verdictLook(cohort.status, kind === 'final');
  return { t, look, verdict: verdictFigures(design, t, look) };
}

/**
 * Each frozen patient's stage (1 for the first n1 counting patients) and whether they are a stage-2
 * patient enrolled at risk, whom the cohort's verdict leaves out: what the exports mark.
 */
export function stagesAtCut(cut: Pick<DataCut, 'kind' | 'snapshot'>, patients: CutPatient[]): Map<string, { stage: 1 | 2; atRisk: boolean }> {
  const marks = new Map<string, { stage: 1 | 2; atRisk: boolean }>();
  for (const cohort of cut.snapshot.cohorts) {
    const countable = patients.filter((p) => p.cohortId === cohort.id).map(toCountable);
    const population = cohort.design?.analysisPopulation ?? 'all_enrolled';
    const stages = assignStages(countable, cohort.design?.n1 ?? null, population);
    const atRisk = cohort.design ? verdictAtCut(cohort, cohort.design, countable, cut.kind).verdict.atRisk > 0 : false;
    for (const p of countable) {
      const stage = stages.get(p.id) ?? 1;
      marks.set(p.id, { stage, atRisk: atRisk && stage === 2 && countsToward(p, population) });
    }
  }
  return marks;
}

/** One cohort with a locked design at the cut, in numbers and states. */
function cohortFigures(cohort: CutCohort, design: CutDesign, patients: CutPatient[], input: AnalysisInput): CohortFigures {
  const population = design.analysisPopulation;
  const countable = patients.map(toCountable);
  const { t, look, verdict } = verdictAtCut(cohort, design, countable, input.cut.kind);
  const x = t.responders;
  const n = t.decided;
  const responseRate =
    n > 0
      ? {
          responders: x,
          decided: n,
          estimate: x / n,
          confLevel: CONF_LEVEL,
          clopperPearson: proportionInterval(x, n, { method: 'clopper-pearson', confLevel: CONF_LEVEL }),
          wilson: proportionInterval(x, n, { method: 'wilson', confLevel: CONF_LEVEL }),
          jeffreys: proportionInterval(x, n, { method: 'jeffreys', confLevel: CONF_LEVEL }),
        }
      : null;
  const test = n > 0 ? binomialTest(x, n, design.p0, { alternative: 'greater', confLevel: CONF_LEVEL }) : null;
  const prior = resolvePrior(input.prior, design.p0, input.priorSource);
  // The predictive probability projects to the attained size at a final look (at least one patient: the prior alone otherwise).
  const nmax = look === 'final' ? Math.max(t.counted, 1) : Math.max(design.n, t.counted);
  const sites = sitesOf(patients, population);
  const withOutcomes = sites.filter((s) => s.decided > 0);
  let het: CohortFigures['heterogeneity'] = null;
  let heterogeneityGap: CohortFigures['heterogeneityGap'] = 'fewer-than-two-sites';
  if (withOutcomes.length >= 2) {
    const result = heterogeneity(withOutcomes.map((s) => [s.responders, s.decided - s.responders]));
    het = { ...result, sites: withOutcomes.length };
    heterogeneityGap = result.pValueExact === null ? 'exact-too-large' : null;
  }
  return {
    cohort,
    design,
    counts: t,
    responseRate,
    exactTest: test ? { pValue: test.pValue, oneSidedLower: test.ci[0], alternative: 'greater', p0: design.p0 } : null,
    rule: verdict,
    inference: look === 'final' ? inferenceOf(design, t, verdict.finalTest) : { state: 'not-applicable' },
    bayes: {
      prior,
      thetaT: input.prior.thetaT,
      nmax,
      posteriorProbability: posteriorProbability({ x, n, p0: design.p0, prior }),
      predictiveProbability: predictiveProbability({ x, n, nmax, p0: design.p0, thetaT: input.prior.thetaT, prior }),
    },
    sites,
    heterogeneity: het,
    heterogeneityGap,
    deviation: deviationOf(design, verdict),
    responderSources: responderSourcesOf(patients, population),
    boundaries: boundariesOf(design),
    path: responderPath(countable, population),
  };
}

const fmt = (v: number, digits = 3) => Number(v.toFixed(digits)).toString();

function describeInference(inference: InferenceFigures): { inference: CohortAnalysis['inference']; inferenceNote: string | null } {
  if (inference.state === 'not-applicable') return { inference: null, inferenceNote: null };
  if (inference.state === 'no-stage-1') return { inference: null, inferenceNote: 'No stage-1 outcome is decided yet.' };
  if (inference.state === 'failed') return { inference: null, inferenceNote: `The stage-wise inference cannot be computed for these counts: ${inference.message}` };
  const notes: string[] = [];
  if (inference.pending > 0) notes.push(`${plural(inference.pending, 'pending outcome')} left out.`);
  if (inference.stage1.actual !== inference.stage1.planned) {
    notes.push(`Stage 1 has ${inference.stage1.actual} decided patients instead of n1 = ${inference.stage1.planned}; the inference uses the actual size.`);
  }
  if (inference.stage2LeftOut > 0) {
    notes.push(`Stage 1 met the futility rule, so the ${plural(inference.stage2LeftOut, 'stage-2 outcome')} are not part of the stage-wise inference.`);
  }
  if (inference.stage2 && inference.stage2.actual !== inference.stage2.planned) {
    notes.push(`Stage 2 has ${inference.stage2.actual} decided patients instead of the planned ${inference.stage2.planned}; the inference uses the actual size.`);
  }
  return { inference: { ...inference.result, note: notes.join(' ') }, inferenceNote: null };
}

function describeDeviation(deviation: DeviationFigures | null): Deviation | null {
  if (!deviation) return null;
  const { applied } = deviation;
  return {
    plannedN1: deviation.plannedN1,
    plannedN: deviation.plannedN,
    attainedN1: deviation.attainedN1,
    attainedN: deviation.attainedN,
    applied: {
      r1: applied.r1,
      r: applied.r,
      characteristics: applied.characteristics,
      note: applied.failure === null ? null : `The operating characteristics of these thresholds cannot be computed at the attained sizes: ${applied.failure}`,
    },
    method: METHODS.deviation,
  };
}

const HETEROGENEITY_GAPS: Record<NonNullable<CohortFigures['heterogeneityGap']>, string> = {
  'exact-too-large': 'The table is too large for the exact test; the chi-square p-value stands alone.',
  'fewer-than-two-sites': 'Fewer than two sites have decided outcomes: no comparison between sites.',
};

/** The cohort's figures with the notes, statements and cautions a person reads beside them. */
function describeCohort(figures: CohortFigures): CohortAnalysis {
  const { cohort, design, counts, bayes } = figures;
  const { inference, inferenceNote } = describeInference(figures.inference);
  const deviation = describeDeviation(figures.deviation);
  const { prior } = bayes;
  const cautions: string[] = [];
  if (counts.pending > 0) cautions.push(`${plural(counts.pending, 'outcome')} still pending at the cut: the figures may change.`);
  if (deviation) cautions.push('The attained sample size differs from the design: read the operating characteristics of the thresholds as applied.');
  if (inference) cautions.push('Report the stage-wise p-value, interval and the UMVUE: the naive figures ignore the stopping rule and are biased.');
  if (figures.responderSources.derived > 0) cautions.push(`${plural(figures.responderSources.derived, 'responder')} rest on outcomes derived from timepoint assessments.`);
  return {
    cohortId: cohort.id,
    code: cohort.code,
    name: cohort.name,
    statusAtCut: cohort.status,
    design: cohort.design,
    counts,
    responseRate: figures.responseRate,
    exactTest: figures.exactTest,
    rule: describeVerdict(figures.rule, design),
    inference,
    inferenceNote,
    bayes: {
      ...bayes,
      statement: `Prior Beta(${fmt(prior.a)}, ${fmt(prior.b)})${prior.source === 'default' ? ' (the default: mean p0, worth one patient)' : ''}; success at the final analysis means P(p > ${fmt(design.p0)}) > ${fmt(bayes.thetaT)} with ${bayes.nmax} patients.`,
    },
    sites: figures.sites,
    heterogeneity: figures.heterogeneity,
    heterogeneityNote: figures.heterogeneityGap && HETEROGENEITY_GAPS[figures.heterogeneityGap],
    deviation,
    responderSources: figures.responderSources,
    boundaries: figures.boundaries,
    path: figures.path,
    cautions,
  };
}

/** A cohort without a locked design at the cut: no rule or test applies. */
function withoutDesign(cohort: CutCohort): CohortAnalysis {
  return {
    cohortId: cohort.id,
    code: cohort.code,
    name: cohort.name,
    statusAtCut: cohort.status,
    design: null,
    counts: null,
    responseRate: null,
    exactTest: null,
    rule: null,
    inference: null,
    inferenceNote: null,
    bayes: null,
    sites: [],
    heterogeneity: null,
    heterogeneityNote: null,
    deviation: null,
    responderSources: { derived: 0, entered: 0 },
    boundaries: [],
    path: [],
    cautions: ['This cohort had no locked design at the cut: no rule or test can be applied.'],
  };
}

function openIssuesOf(patients: CutPatient[]): OpenIssue[] {
  const issues: OpenIssue[] = [];
  for (const p of patients) {
    const where = { studyId: p.studyId, siteCode: p.siteCode, cohortCode: p.cohortCode };
    if (p.outcome === 'pending') issues.push({ ...where, issue: 'pending_outcome', detail: 'Outcome not yet recorded.' });
    else if (!p.attested) issues.push({ ...where, issue: 'unattested_outcome', detail: `Outcome ${p.bestOverallResponse ?? p.outcome} not yet attested by the investigator.` });
    if (p.outcomeFlag) issues.push({ ...where, issue: 'outcome_flag', detail: p.outcomeFlag });
    if (!p.evaluable) issues.push({ ...where, issue: 'not_evaluable', detail: p.notEvaluableReason ?? 'Not evaluable.' });
  }
  return issues;
}

export function analyseCut(input: AnalysisInput): Analysis {
  const cohorts = input.snapshot.cohorts.map((cohort) =>
    cohort.design
      ? describeCohort(
          cohortFigures(
            cohort,
            cohort.design,
            input.patients.filter((p) => p.cohortId === cohort.id),
            input,
          ),
        )
      : withoutDesign(cohort),
  );
  const tested = cohorts.flatMap((c) => {
    if (!c.exactTest) return [];
    const stageWise = c.rule?.finalTest?.method === 'stage-wise' ? c.rule.finalTest : null;
    const basis: FinalTest['method'] = stageWise ? 'stage-wise' : 'exact-binomial';
    return [{ cohortId: c.cohortId, code: c.code, p0: c.exactTest.p0, basis, pValue: stageWise ? stageWise.pValue : c.exactTest.pValue }];
  });
  let multiplicity: Multiplicity | null = null;
  if (input.snapshot.cohorts.length > 1 && tested.length >= 2) {
    const ps = tested.map((row) => row.pValue);
    const holm = adjustPValues(ps, 'holm');
    const bh = adjustPValues(ps, 'bh');
    multiplicity = { method: METHODS.multiplicity, rows: tested.map((row, i) => ({ ...row, holm: holm[i], bh: bh[i] })) };
  }
  const saved = input.prior.a !== null && input.prior.b !== null;
  const openIssues = openIssuesOf(input.patients);
  const cautions = [...CAUTIONS];
  const pending = openIssues.filter((i) => i.issue === 'pending_outcome').length;
  const unattested = openIssues.filter((i) => i.issue === 'unattested_outcome').length;
  if (pending + unattested > 0) {
    cautions.push(`At the cut ${plural(pending, 'outcome')} were pending and ${plural(unattested, 'outcome')} not yet attested.`);
  }
  if (multiplicity) cautions.push('Several cohorts are tested: read the Holm and Benjamini–Hochberg adjusted p-values.');
  return {
    cut: input.cut,
    trial: input.snapshot.trial,
    confLevel: CONF_LEVEL,
    prior: {
      a: saved ? input.prior.a : null,
      b: saved ? input.prior.b : null,
      thetaT: input.prior.thetaT,
      source: saved ? input.priorSource : 'default',
      statement: saved
        ? `Beta(${fmt(input.prior.a as number)}, ${fmt(input.prior.b as number)}) for every cohort, θT = ${fmt(input.prior.thetaT)}.`
        : `Default: Beta(p0, 1 − p0) for each cohort — centred on its null rate and worth one patient — with θT = ${fmt(input.prior.thetaT)}.`,
    },
    cohorts,
    multiplicity,
    openIssues,
    cautions,
    methods: METHODS,
    rulesStatement: [...VERDICT_RULES],
    safety: input.snapshot.cohorts.map((cohort) =>
      cohortSafety({
        cohort,
        patients: input.patients.filter((p) => p.cohortId === cohort.id),
        events: input.adverseEvents ?? [],
        eventsFrozen: input.snapshot.adverseEventsFrozen === true,
        cutOn: input.cut.cutAt.slice(0, 10),
        response: cohorts.find((c) => c.cohortId === cohort.id)?.counts ?? null,
      }),
    ),
  };
}
