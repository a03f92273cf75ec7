/**
 * Orrery's statistics engine: pure functions, numbers in and numbers out, no I/O. Every function
 * validates its input and throws StatsInputError naming the offending field. Methods and sources are
 * listed in the product's STATISTICS.md.
 */
export { StatsInputError } from './errors.js';
export { binomialTest, proportionInterval } from './binomial.js';
export type { Alternative, IntervalMethod, BinomialTestResult } from './binomial.js';
export { singleStageDesign, simonDesigns, operatingCharacteristics } from './designs.js';
export type {
  DesignSettings,
  SingleStageDesign,
  TwoStageDesign,
  AdmissibleDesign,
  SimonDesigns,
  DesignRule,
  OperatingPoint,
} from './designs.js';
export { evaluateTwoStage } from './interim.js';
export type { InterimStage, InterimDecision, InterimCounts, InterimStatus } from './interim.js';
export { twoStageInference, stageWisePValue, stageWiseThreshold } from './inference.js';
export type { InferenceDesign, TwoStageObservation, TwoStageInference } from './inference.js';
export { koyamaChenPValue } from './koyama-chen.js';
export type { KoyamaChenObservation } from './koyama-chen.js';
export { cohortVerdict } from './verdict.js';
export type { Verdict, VerdictDesign, VerdictCounts, VerdictLook, StageCounts, FinalTest } from './verdict.js';
export { posteriorProbability, predictiveProbability } from './bayes.js';
export type { BetaPrior, PosteriorInput, PredictiveInput } from './bayes.js';
export { adjustPValues } from './multiplicity.js';
export type { AdjustMethod } from './multiplicity.js';
export { heterogeneity } from './heterogeneity.js';
export type { HeterogeneityResult } from './heterogeneity.js';
export { toxicityBoundary, toxicityBoundaryCharacteristics, TOXICITY_BOUNDARY_NMAX } from './toxicity-boundary.js';
export type { ToxicityBoundarySettings, ToxicityBoundary, ToxicityOperatingPoint } from './toxicity-boundary.js';
export { bryantDayDesigns, bryantDayCharacteristics, BRYANT_DAY_NMAX_LIMIT } from './bryant-day.js';
export type {
  BryantDaySettings,
  BryantDayRule,
  BryantDayDesign,
  BryantDayDesigns,
  BryantDayScenario,
  BryantDayPoint,
} from './bryant-day.js';
