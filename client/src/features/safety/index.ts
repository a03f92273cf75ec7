/**
 * What other features use of Safety: the patient page's events panel, the overview's live safety
 * (load it lazily: the overview comes with the app), safety's part of Needs attention, and the keys.
 */
export { AdverseEventsPanel } from './adverse-events-panel';
export { SafetyOverview } from './safety-state';
export { safetyKeys } from './query-keys';
export { SafetyAttention } from './safety-attention';
