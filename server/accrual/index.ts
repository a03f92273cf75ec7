/**
 * Accrual: the Accrual page, and the enrolment counts, projections and calendar arithmetic the
 * Portfolio and the digest share. Other features import this feature only through this file.
 */
export { cohortTallies, emptyTally } from './accrual.repository.js';
export type { CohortTally } from './accrual.repository.js';
export { accrualRoutes } from './accrual.routes.js';
export { countsUnder, designTargets, enrolmentCounts, trialAccrual } from './accrual.service.js';
export type { DesignTargets, EnrolmentCounts, TrialAccrual } from './accrual.service.js';
export { daysBetween, isoWeekOf, toDay } from './calendar.js';
