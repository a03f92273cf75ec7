/**
 * The analysis of a data cut, computed from its frozen snapshot only (never from live patients), so
 * the same cut always gives the same figures. Counting follows the protocol's analysis population
 * (server/evaluation/counting.ts); every number comes from the statistics engine (server/stats).
 * Compute, then describe: `cohortFigures` returns numbers and states only, `describeCohort` turns
 * them into the notes and cautions a person reads. Pure: no database, no I/O — the report, the API
 * and the tests all call `analyseCut`.
 */
import { countsToward, effectiveOutcome, responderPath, tally, type CountablePatient, type Tally } from '../evaluation/index.js';
import {
  StatsInputError,
  adjustPValues,
  binomialTest,
  evaluateTwoStage,
  heterogeneity,
  operatingCharacteristics,
  posteriorProbability,
  predictiveProbability,
  proportionInterval,
  twoStageInference,
  type DesignRule,
  type HeterogeneityResult,
  type InterimStatus,
  type TwoStageInference,
} from '../stats/index.js';
import { CAUTIONS, plural } from '../words/index.js';
import type { CutCohort, CutDesign, CutPatient, CutSnapshot } from './data-cuts.repository.js';
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

export type Deviation = {
  plannedN1: number | null;
  actualN1: number | null;
  plannedN: number;
  actualN: number;
  asApplied: { rule: DesignRule; characteristics: OperatingSummary | null; note: string | null };
  adjusted: { r1: number | null; r: number | null; characteristics: OperatingSummary | null; note: string | null };
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
  rule: (InterimStatus & { applied: 'stage1' | 'final'; note: string | null }) | null;
  inference: (TwoStageInference & { x1: number; n1: number; x2: number | null; n2Actual: number; confLevel: number; note: string }) | null;
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
  rows: Array<{ cohortId: string; code: string; p0: number; pValue: number; holm: number; bh: number }>;
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
  /** Per cohort: adverse events, toxicities against the locked definition, the safety rule and the joint verdict. */
  safety: CohortSafetyAnalysis[];
};

/** Why a threshold could not be found or applied: none exists at these sizes, or the engine refused the sizes. */
type ThresholdFailure = { kind: 'none-found' } | { kind: 'engine'; message: string };

/** A deviation from the planned sizes, in numbers. */
type DeviationFigures = Omit<Deviation, 'asApplied' | 'adjusted' | 'method'> & {
  asApplied: { rule: DesignRule; characteristics: OperatingSummary | null; failure: string | null };
  adjusted: { r1: number | null; r: number | null; characteristics: OperatingSummary | null; failure: ThresholdFailure | null };
};

/** The rule as applied at the cut, and what bears on how it was applied. */
type RuleFigures = {
  status: InterimStatus;
  applied: 'stage1' | 'final';
  /** Stage-2 outcomes held back until every stage-1 outcome is in. */
  waitingStage2: number;
  /** More decided patients than the planned n: the adjusted threshold shown, and the size it applies to (single stage). */
  overRun: { stages: 1 | 2; decided: number; r: number; n: number } | null;
};

type InferenceResult = TwoStageInference & { x1: number; n1: number; x2: number | null; n2Actual: number; confLevel: number };

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
  rule: RuleFigures;
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
  rule: 'Stage 1: stop for futility when responders ≤ r1 among n1; final: promising when responders > r among n. A rule is determined early once the remaining patients cannot change it.',
  inference:
    'After a two-stage design: p-value and 95% interval under the stage-wise ordering (Koyama & Chen 2008) and the unbiased estimate (UMVUE, Jung & Kim 2004), computed with the actual stage-2 size. The naive estimate and interval ignore the stopping rule and are biased.',
  bayes:
    'Posterior probability P(p > p0 | data) under a Beta(a, b) prior, and the predictive probability that at nmax patients the posterior probability will exceed θT (Lee & Liu 2008). Default prior: Beta(p0, 1 − p0) — centred on the null rate and worth one patient, so the data dominate; default θT = 0.90.',
  sites: 'Response by site with exact (Clopper–Pearson) 95% intervals; heterogeneity by Pearson chi-square and the exact Fisher / Freeman–Halton test over sites with decided outcomes.',
  multiplicity: 'Each cohort against its own p0 (exact one-sided test); adjusted p-values by Holm (1979) and Benjamini–Hochberg (1995) across the cohorts with decided outcomes.',
  deviation:
    'When the actual stage-1 or total size differs from the design’s n1 or n: the planned thresholds applied to the actual sizes, with their exact type I error, power, PET0 and EN0 (binomial); and adjusted thresholds (common practice): r1′ is the largest futility threshold whose probability of stopping under p1 at the actual stage-1 size does not exceed the planned design’s, and r′ is the smallest final threshold that keeps the exact type I error at or below α given r1′ and the actual sizes.',
};

function ruleOf(design: CutDesign, n1: number | null, n: number): DesignRule {
  return design.r1 !== null && n1 !== null ? { r1: design.r1, n1, r: design.r, n } : { r: design.r, n };
}

function characteristics(rule: DesignRule, p0: number, p1: number): OperatingSummary {
  const [atP0, atP1] = operatingCharacteristics(rule, [p0, p1]);
  return { typeIError: atP0.probPromising, power: atP1.probPromising, pet0: rule.r1 === undefined ? null : atP0.pet, en0: atP0.expectedN };
}

/** Largest futility threshold at n1′ whose chance of stopping under p1 is no more than the planned design's. */
function adjustedR1(design: CutDesign, actualN1: number): number | null {
  if (design.r1 === null || design.n1 === null) return null;
  if (actualN1 === design.n1) return design.r1;
  // P(X1 ≤ k | n, p1) = 1 − P(promising) of the single-stage rule "more than k among n".
  const stopUnderP1 = (k: number, n: number) => 1 - operatingCharacteristics({ r: k, n }, [design.p1])[0].probPromising;
  const planned = stopUnderP1(design.r1, design.n1);
  let best: number | null = null;
  for (let k = 0; k < actualN1; k++) {
    if (stopUnderP1(k, actualN1) <= planned + 1e-12) best = k;
    else break;
  }
  return best;
}

/** Smallest final threshold keeping the exact type I error at or below α with the actual sizes. */
function adjustedR(design: CutDesign, r1: number | null, n1: number | null, n: number): number | null {
  for (let r = Math.max(0, r1 ?? 0); r < n; r++) {
    const rule: DesignRule = r1 !== null && n1 !== null ? { r1, n1, r, n } : { r, n };
    try {
      if (operatingCharacteristics(rule, [design.p0])[0].probPromising <= design.alpha) return r;
    } catch (error) {
      if (!(error instanceof StatsInputError)) throw error;
    }
  }
  return null;
}

function deviationOf(design: CutDesign, kind: CutKind, t: Tally): DeviationFigures | null {
  if (t.counted === 0) return null;
  const twoStage = design.r1 !== null && design.n1 !== null;
  let actualN1: number | null = null;
  let actualN = design.n;
  let deviates = false;
  if (twoStage && kind === 'interim') {
    // At an interim cut every counting patient already enrolled belongs to the look at stage 1.
    actualN1 = t.counted;
    deviates = actualN1 > (design.n1 as number);
  } else if (twoStage) {
    actualN1 = t.stage1.counted;
    actualN = t.counted;
    const stoppedAtStage1 = t.stage2.counted === 0 && t.stage1.responders <= (design.r1 as number);
    deviates = actualN1 !== design.n1 || (!stoppedAtStage1 && actualN !== design.n);
  } else if (kind === 'final') {
    actualN = t.counted;
    deviates = actualN !== design.n;
  }
  if (!deviates) return null;
  if (twoStage && actualN1 !== null && actualN1 >= actualN) actualN = Math.max(design.n, actualN1 + 1);

  const asAppliedRule = ruleOf(design, actualN1, actualN);
  let asAppliedOc: OperatingSummary | null = null;
  let asAppliedFailure: string | null = null;
  try {
    asAppliedOc = characteristics(asAppliedRule, design.p0, design.p1);
  } catch (error) {
    if (!(error instanceof StatsInputError)) throw error;
    asAppliedFailure = error.message;
  }
  const r1Adj = twoStage ? adjustedR1(design, actualN1 as number) : null;
  const rAdj = twoStage && r1Adj === null ? null : adjustedR(design, r1Adj, twoStage ? actualN1 : null, actualN);
  let adjustedOc: OperatingSummary | null = null;
  let adjustedFailure: ThresholdFailure | null = null;
  if (rAdj === null) {
    adjustedFailure = { kind: 'none-found' };
  } else {
    try {
      adjustedOc = characteristics(r1Adj !== null ? { r1: r1Adj, n1: actualN1 as number, r: rAdj, n: actualN } : { r: rAdj, n: actualN }, design.p0, design.p1);
    } catch (error) {
      if (!(error instanceof StatsInputError)) throw error;
      adjustedFailure = { kind: 'engine', message: error.message };
    }
  }
  return {
    plannedN1: design.n1,
    actualN1,
    plannedN: design.n,
    actualN,
    asApplied: { rule: asAppliedRule, characteristics: asAppliedOc, failure: asAppliedFailure },
    adjusted: { r1: r1Adj, r: rAdj, characteristics: adjustedOc, failure: adjustedFailure },
  };
}

function ruleStatus(design: CutDesign, t: Tally, deviation: DeviationFigures | null): RuleFigures {
  const twoStage = design.r1 !== null && design.n1 !== null;
  const plain = { waitingStage2: 0, overRun: null };
  if (!twoStage) {
    if (t.decided <= design.n) {
      return { status: evaluateTwoStage({ r: design.r, n: design.n }, { responders: t.responders, evaluable: t.decided }), applied: 'final', ...plain };
    }
    const r = deviation?.adjusted.r ?? design.r;
    const n = Math.max(t.decided, deviation?.actualN ?? t.decided);
    return {
      status: evaluateTwoStage({ r, n }, { responders: t.responders, evaluable: t.decided }),
      applied: 'final',
      waitingStage2: 0,
      overRun: { stages: 1, decided: t.decided, r, n },
    };
  }
  const r1 = design.r1 as number;
  const n1 = design.n1 as number;
  const { stage1, stage2 } = t;
  if (stage1.decided < n1 || stage2.counted === 0) {
    return {
      status: evaluateTwoStage({ r1, n1, r: design.r, n: design.n }, { responders: stage1.responders, evaluable: stage1.decided }),
      applied: 'stage1',
      waitingStage2: stage2.decided,
      overRun: null,
    };
  }
  const evaluable = n1 + stage2.decided;
  const responders = stage1.responders + stage2.responders;
  if (evaluable <= design.n) {
    return {
      status: evaluateTwoStage({ r1, n1, r: design.r, n: design.n }, { responders, evaluable, stage1Responders: stage1.responders }),
      applied: 'final',
      ...plain,
    };
  }
  const r = Math.max(deviation?.adjusted.r ?? design.r, r1);
  return {
    status: evaluateTwoStage({ r1, n1, r, n: evaluable }, { responders, evaluable, stage1Responders: stage1.responders }),
    applied: 'final',
    waitingStage2: 0,
    overRun: { stages: 2, decided: evaluable, r, n: evaluable },
  };
}

function inferenceOf(design: CutDesign, t: Tally): InferenceFigures {
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
      result: { ...result, x1, n1, x2: stopped ? null : stage2.responders, n2Actual, confLevel: CONF_LEVEL },
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

/** One cohort with a locked design at the cut, in numbers and states. */
function cohortFigures(cohort: CutCohort, design: CutDesign, patients: CutPatient[], input: AnalysisInput): CohortFigures {
  const population = design.analysisPopulation;
  const countable = patients.map(toCountable);
  const t = tally(countable, design.n1, population);
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
  const deviation = deviationOf(design, input.cut.kind, t);
  const prior = resolvePrior(input.prior, design.p0, input.priorSource);
  const nmax = Math.max(design.n, n);
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
    rule: ruleStatus(design, t, deviation),
    inference: input.cut.kind === 'final' ? inferenceOf(design, t) : { state: 'not-applicable' },
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
    deviation,
    responderSources: responderSourcesOf(patients, population),
    boundaries: boundariesOf(design),
    path: responderPath(countable, population),
  };
}

const fmt = (v: number, digits = 3) => Number(v.toFixed(digits)).toString();

function ruleNote(rule: RuleFigures, design: CutDesign): string | null {
  if (rule.overRun?.stages === 1) {
    return `More decided patients (${rule.overRun.decided}) than the planned n = ${design.n}: the rule shown uses the adjusted threshold r′ = ${rule.overRun.r} for n = ${rule.overRun.n}.`;
  }
  if (rule.overRun) return `More decided patients (${rule.overRun.decided}) than the planned n = ${design.n}: the final rule shown uses the adjusted threshold r′ = ${rule.overRun.r}.`;
  return rule.waitingStage2 > 0 ? `${plural(rule.waitingStage2, 'stage-2 outcome')} wait until every stage-1 outcome is in.` : null;
}

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
  const { asApplied, adjusted } = deviation;
  const adjustedNote =
    adjusted.failure?.kind === 'none-found'
      ? 'No threshold at these sizes keeps the type I error at or below α and the futility loss no worse than planned.'
      : (adjusted.failure?.message ?? null);
  return {
    plannedN1: deviation.plannedN1,
    actualN1: deviation.actualN1,
    plannedN: deviation.plannedN,
    actualN: deviation.actualN,
    asApplied: {
      rule: asApplied.rule,
      characteristics: asApplied.characteristics,
      note: asApplied.failure === null ? null : `The planned thresholds cannot be applied to these sizes: ${asApplied.failure}`,
    },
    adjusted: { r1: adjusted.r1, r: adjusted.r, characteristics: adjusted.characteristics, note: adjustedNote },
    method: METHODS.deviation,
  };
}

const HETEROGENEITY_GAPS: Record<NonNullable<CohortFigures['heterogeneityGap']>, string> = {
  'exact-too-large': 'The table is too large for the exact test; the chi-square p-value stands alone.',
  'fewer-than-two-sites': 'Fewer than two sites have decided outcomes: no comparison between sites.',
};

/** The cohort's figures with the notes, statements and cautions a person reads beside them. */
function describeCohort(figures: CohortFigures): CohortAnalysis {
  const { cohort, design, counts, rule, bayes } = figures;
  const note = ruleNote(rule, design);
  const { inference, inferenceNote } = describeInference(figures.inference);
  const deviation = describeDeviation(figures.deviation);
  const { prior } = bayes;
  const cautions: string[] = [];
  if (counts.pending > 0) cautions.push(`${plural(counts.pending, 'outcome')} still pending at the cut: the figures may change.`);
  if (deviation) cautions.push('The actual sample size differs from the design: read the operating characteristics of the rule as applied.');
  if (inference) cautions.push('Report the stage-wise p-value, interval and the UMVUE: the naive figures ignore the stopping rule and are biased.');
  if (figures.responderSources.derived > 0) cautions.push(`${plural(figures.responderSources.derived, 'responder')} rest on outcomes derived from timepoint assessments.`);
  if (note) cautions.push(note);
  return {
    cohortId: cohort.id,
    code: cohort.code,
    name: cohort.name,
    statusAtCut: cohort.status,
    design: cohort.design,
    counts,
    responseRate: figures.responseRate,
    exactTest: figures.exactTest,
    rule: { ...rule.status, applied: rule.applied, note },
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
  const tested = cohorts.filter((c) => c.exactTest);
  let multiplicity: Multiplicity | null = null;
  if (input.snapshot.cohorts.length > 1 && tested.length >= 2) {
    const ps = tested.map((c) => c.exactTest!.pValue);
    const holm = adjustPValues(ps, 'holm');
    const bh = adjustPValues(ps, 'bh');
    multiplicity = {
      method: METHODS.multiplicity,
      rows: tested.map((c, i) => ({ cohortId: c.cohortId, code: c.code, p0: c.exactTest!.p0, pValue: ps[i], holm: holm[i], bh: bh[i] })),
    };
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
