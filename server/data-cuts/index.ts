/**
 * Data cuts, their analysis, the committee's recommendations and the applied decisions. Other
 * features import this feature only through this file.
 */
export { releaseToSponsor } from './data-cuts.repository.js';
export { dataCutsRoutes } from './data-cuts.routes.js';
export type { DecisionAction, RecommendationDecision, StatusDecision } from './data-cuts.schema.js';
export { DECISION_TARGET, applyWithin, freezeWithin, signWithin } from './data-cuts.service.js';
export { insertDecision } from './decisions.repository.js';
