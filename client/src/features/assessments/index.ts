/** What other features use of timepoint assessments: the panel the patient page shows. */
export { AssessmentsPanel } from './assessments-panel';
