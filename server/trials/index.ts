/**
 * Trial set-up: the routes, the trials store (trials, cohorts, trial sites, protocol settings) and
 * the cohort's life. Other features import this feature only through this file.
 */
export { canTransition, pauseForSafety, resumeAfterSafetyReview, safetyReviewOf, transitionCohort } from './cohort-status.js';
export { findCohort, findProtocolSettings, findTrial, findTrialHeading, listCohorts, listTrialSites, lockCohort, lockTrialHeading, trialCode, trialFacts } from './trials.repository.js';
export type { Cohort, CohortRef, SafetyPause, CohortStatus, ProtocolSettings, SiteRef, Trial, TrialFacts, TrialForUser } from './trials.repository.js';
export { trialsRoutes } from './trials.routes.js';
export { listTrialsForUser } from './user-trials.js';
export type { StopCategory } from './trials.schema.js';
