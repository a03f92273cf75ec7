/**
 * Timepoint assessments and the outcome derived from them: the routes, and the listeners that re-
 * derive after a patient write or a change of the protocol's outcome rules. Other features import
 * this feature only through this file.
 */
export { assessmentsRoutes } from './assessments.routes.js';
export { rederiveAfterPatientWrite, rederiveTrialAfterSettingsChange } from './assessments.service.js';
export type { Derivation } from './derivation.js';
