/** What the assessments endpoints return: the server's own types. */
export type { AttentionItem, AttentionKind, Derivation, DerivationStep, TimepointResponse } from '../../../../server/assessments/derivation';
export type { Assessment } from '../../../../server/assessments/assessments.repository';
export type { AssessmentsView, PatientSummary as AssessedPatientSummary } from '../../../../server/assessments/assessments.service';
