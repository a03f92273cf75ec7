/**
 * A valid body for each write route that reaches a record through a second id, keyed by
 * "METHOD /path". The cross-access suite sends it with another trial's or another site's ids: a
 * valid body means a refusal can only come from the ownership check (404), not from validation.
 * Routes without an entry are still called, with an empty body, and listed as such.
 */
const DESIGN = {
  p0: 0.2,
  p1: 0.4,
  alpha: 0.05,
  beta: 0.2,
  nmax: 60,
  analysisPopulation: 'all_enrolled',
  interimAccrual: 'pause',
  sponsorSeesResponse: false,
  protocolReference: 'XOVER-1',
  selection: 'optimal',
  confirmMeaning: true,
};

export const validBodies: Record<string, () => Record<string, unknown>> = {
  'PATCH /api/trials/:trialId/cohorts/:cohortId': () => ({ code: 'XOVER', name: 'Cross-access attempt', version: 1 }),
  'PATCH /api/trials/:trialId/memberships/:membershipId': () => ({ role: 'monitor', siteId: null, version: 1 }),
  'DELETE /api/trials/:trialId/memberships/:membershipId': () => ({ version: 1 }),
  'POST /api/trials/:trialId/cohorts/:cohortId/design': () => DESIGN,
  'POST /api/trials/:trialId/cohorts/:cohortId/design/amendments': () => ({ ...DESIGN, reason: 'Cross-access attempt' }),
  'POST /api/trials/:trialId/cohorts/:cohortId/transitions': () => ({ to: 'stopped', reason: 'Cross-access attempt', stopCategory: 'other' }),
  'POST /api/trials/:trialId/patients/:patientId/assessments': () => ({ date: '2026-06-01', response: 'PR' }),
  'PATCH /api/trials/:trialId/patients/:patientId/assessments/:assessmentId': () => ({ response: 'PD', version: 1, reason: 'Cross-access attempt' }),
  'DELETE /api/trials/:trialId/patients/:patientId/assessments/:assessmentId': () => ({ version: 1, reason: 'Cross-access attempt' }),
  'PATCH /api/trials/:trialId/patients/:patientId': () => ({
    version: 1,
    outcome: 'responder',
    bestOverallResponse: 'PR',
    responseAssessedOn: '2026-06-01',
    evaluable: true,
    reason: 'Cross-access attempt',
  }),
  'POST /api/trials/:trialId/patients/:patientId/attestation': () => ({ version: 1 }),
  'POST /api/trials/:trialId/patients/:patientId/adverse-events': () => ({
    onsetOn: '2026-06-01',
    term: 'Cross-access attempt',
    grade: 2,
    attribution: 'possible',
    serious: false,
    outcome: 'recovering',
  }),
  'PATCH /api/trials/:trialId/patients/:patientId/adverse-events/:eventId': () => ({ grade: 3, version: 1, reason: 'Cross-access attempt' }),
  'DELETE /api/trials/:trialId/patients/:patientId/adverse-events/:eventId': () => ({ version: 1, reason: 'Cross-access attempt' }),
  'POST /api/trials/:trialId/patients/:patientId/adverse-events/:eventId/attestation': () => ({ version: 1 }),
  'PATCH /api/data-cuts/:cutId/prior': () => ({ a: 1, b: 1, thetaT: 0.9, version: 1 }),
  'POST /api/data-cuts/:cutId/recommendations': () => ({ decision: 'continue', rationale: 'Cross-access attempt by a non-member.', analysisVersion: 1 }),
  'POST /api/data-cuts/:cutId/decision': () => ({ action: 'resume_stage_2', reason: 'Cross-access attempt' }),
};
