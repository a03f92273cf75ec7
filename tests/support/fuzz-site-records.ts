/**
 * Records that belong to one site of a trial, for the cross-site checks: a coordinator or
 * investigator must not reach them at a site they do not work at. Filled in path order, so a
 * parameter may use the ones before it (an assessment of that patient). Extend as features add
 * site-scoped records.
 */
import type { Stack } from './stack.js';
import type { TrialFixture } from './factories.js';
import { daysFromToday, enrolOne, matrixAssessment } from './assessment-factories.js';
import { matrixEvent } from './safety-factories.js';

export type SiteRecordContext = { stack: Stack; trial: TrialFixture; site: string; earlier: Record<string, string> };

export const siteScopedParams: Record<string, (context: SiteRecordContext) => Promise<string>> = {
  patientId: async ({ stack, trial, site }) => (await enrolOne(stack.db, trial, { site, enrolledOn: daysFromToday(-120) })).id,
  assessmentId: async ({ stack, trial, earlier }) => matrixAssessment(stack.db, trial, earlier.patientId),
  eventId: async ({ stack, trial, earlier }) => matrixEvent(stack.db, trial, earlier.patientId),
};
