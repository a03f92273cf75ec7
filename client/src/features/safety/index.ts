/** What other features use of Safety: the patient page's events panel, the overview's live safety, the pause tag and the keys. */
export { AdverseEventsPanel } from './adverse-events-panel';
export { SafetyOverview } from './safety-state';
export { PausedTag } from './words';
export { safetyKeys } from './query-keys';
