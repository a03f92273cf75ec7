/**
 * Real record ids for the route parameters the permission matrix fills in, so that a route
 * reached through a record (a patient, a data cut …) is judged on the role, not on a missing
 * record. Each feature adds the parameters its routes use; `:trialId` is the fixture trial.
 */
import type { Stack } from './stack.js';
import type { TrialFixture } from './factories.js';
import { createPendingMembership } from './people-factories.js';
import { matrixCut } from './data-cut-factories.js';
import { matrixAssessment, matrixPatient } from './assessment-factories.js';
import { matrixEvent } from './safety-factories.js';

export type ParamContext = { stack: Stack; trial: TrialFixture };

export const paramFixtures: Record<string, (context: ParamContext) => Promise<string>> = {
  cohortId: ({ trial }) => Promise.resolve(trial.cohortIds[0]),
  siteId: ({ trial }) => Promise.resolve(Object.values(trial.siteIds)[0]),
  // A fresh pending membership per route, so an allowed DELETE removes nobody the matrix needs.
  membershipId: async ({ stack, trial }) => (await createPendingMembership(stack.db, trial.trialId)).id,
  // One interim cut on the fixture trial's first cohort, shared by every data-cut route.
  cutId: async ({ stack, trial }) => matrixCut(stack.db, trial),
  // One patient at the coordinator's site, and one assessment of that patient.
  patientId: async ({ stack, trial }) => matrixPatient(stack.db, trial),
  assessmentId: async ({ stack, trial }) => matrixAssessment(stack.db, trial, await matrixPatient(stack.db, trial)),
  // One adverse event of that patient.
  eventId: async ({ stack, trial }) => matrixEvent(stack.db, trial, await matrixPatient(stack.db, trial)),
};
