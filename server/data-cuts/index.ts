/**
 * Data cuts, their analysis, the committee's recommendations and the applied decisions. Other
 * features import this feature only through this file.
 */
export type { CohortAnalysis } from './analysis.js';
export type { CohortSafetyAnalysis } from './safety-analysis.js';
export { dataCutsRoutes } from './data-cuts.routes.js';
export type { CutKind, DecisionAction, RecommendationDecision, StatusDecision } from './data-cuts.schema.js';
export { DECISION_TARGET, applyWithin, freezeWithin, releaseCohort, signWithin } from './data-cuts.service.js';
export { insertDecision } from './decisions.repository.js';
