/** What other features use of timepoint assessments: the panel the patient page shows, and the keys a patient write makes stale. */
export { AssessmentsPanel } from './assessments-panel';
export { assessmentKeys } from './query-keys';
