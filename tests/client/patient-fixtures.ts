/** Invented patient records for the patients form tests, shaped as the patients API answers. */
import type { Patient } from '../../client/src/features/patients/types';

export const TRIAL_ID = 't-0001';

export function patientRecord(overrides: Partial<Patient> = {}): Patient {
  return {
    id: 'p-0001',
    trialId: TRIAL_ID,
    studyId: 'RVG-014',
    siteId: 's-rvg',
    siteCode: 'RVG',
    cohortId: 'c-a',
    cohortCode: 'A',
    stage: 1,
    enrolmentSeq: 14,
    enrolledOn: '2026-03-02',
    outcome: 'pending',
    bestOverallResponse: null,
    responseAssessedOn: null,
    evaluable: true,
    notEvaluableReason: null,
    attested: null,
    version: 1,
    derivedBestOverallResponse: null,
    derivedResponder: null,
    derivation: null,
    outcomeFlag: null,
    updatedAt: '2026-03-02T10:00:00.000Z',
    ...overrides,
  };
}
