/** The scheduled jobs every server process offers to run (each runs once per period across all processes). */
import type { ScheduledJob } from './jobs.js';
import { weeklyDigestJob } from './weekly-digest.js';

export const scheduledJobs: ScheduledJob[] = [weeklyDigestJob];
