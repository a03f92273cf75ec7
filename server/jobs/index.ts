/**
 * Scheduled jobs, each run once per period across every server process. Other features import this
 * feature only through this file.
 */
export { startJobs } from './jobs.js';
export type { Jobs, ScheduledJob } from './jobs.js';
export { weeklyDigestJob } from './weekly-digest.js';
