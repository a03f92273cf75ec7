/**
 * Safety: adverse events, the protocol's toxicity definition applied to each patient, the live
 * safety state, the enforcement of a cohort's safety rule and the stateless safety calculations.
 * Other features import this feature only through this file.
 */
export { safetyRoutes } from './safety.routes.js';
export { applySafetyAfterDesignSigned, applySafetyRules, currentSafetyState, ruleOfDesign, ruleToxicities } from './safety-rules.js';
export { safetyCounts } from './safety.repository.js';
export { countToxicities, deriveToxicity, safetyRuleState, toxicityRate, type SafetyRuleOfDesign, type ToxicityRate } from './toxicity.js';
export { listEventsOfCohorts } from './adverse-events.repository.js';
export { RELATED_ATTRIBUTIONS } from './safety.schema.js';
export type { Attribution, EventOutcome, JointVerdict, SafetyCounts, SafetyRuleState, BryantDayCharacteristicsInput, SafetyDesignSettings, SafetyRule, ToxicityBoundarySettings } from './safety.schema.js';
