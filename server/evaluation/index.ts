/**
 * How patients count (the one definition), the live evaluation of a trial's cohorts, and the store
 * of figures a committee decision released. Other features import this feature only through this file.
 */
export { assignStages, countsToward, effectiveOutcome, responderPath, tally } from './counting.js';
export type { AnalysisPopulation, CountablePatient, Outcome, Tally } from './counting.js';
export { countCounting } from './evaluation.repository.js';
export { describeVerdict, verdictFigures, verdictLook } from './verdict.js';
export type { CohortVerdict } from './verdict.js';
export { evaluationRoutes } from './evaluation.routes.js';
export { insertReleasedFigures, latestReleased } from './released.repository.js';
export type { ReleasedAnalysis, ReleasedFigures } from './released.repository.js';
