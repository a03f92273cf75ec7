/** Frozen patients of a data cut built in memory, for the pure analysis (`analyseCut`) without a database. */
import type { CutPatient } from '../../server/data-cuts/data-cuts.repository.js';

export type FrozenSpec = { outcome: CutPatient['outcome']; evaluable?: boolean };

/**
 * One frozen patient per spec, in enrolment order, alternating between sites SA and SB; a patient
 * who is not evaluable withdrew.
 */
export function frozenPatients(specs: FrozenSpec[], cohortId = 'cohort', cohortCode = 'MAIN'): CutPatient[] {
  return specs.map((s, i) => ({
    patientId: `${cohortId}-p${i + 1}`,
    studyId: `${i % 2 ? 'SB' : 'SA'}-${String(i + 1).padStart(3, '0')}`,
    siteId: i % 2 ? 'site-b' : 'site-a',
    siteCode: i % 2 ? 'SB' : 'SA',
    cohortId,
    cohortCode,
    stage: 1,
    enrolmentSeq: i + 1,
    enrolledOn: '2026-01-01',
    outcome: s.outcome,
    bestOverallResponse: s.outcome === 'responder' ? 'PR' : s.outcome === 'non_responder' ? 'SD' : null,
    responseAssessedOn: null,
    evaluable: s.evaluable ?? true,
    notEvaluableReason: s.evaluable === false ? 'Withdrew' : null,
    attested: true,
    attestationSignatureId: null,
    derivedBestOverallResponse: null,
    derivedResponder: null,
    outcomeFlag: null,
    patientVersion: 1,
    assessments: [],
  }));
}
