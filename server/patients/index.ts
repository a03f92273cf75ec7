/**
 * Patients and outcomes: the routes, the patients store (the only writer of the patients table)
 * and restaging. Other features import this feature only through this file.
 */
export { restageCohort } from './accrual-rules.js';
export { countEnrolledByCohort, countPatientsAtSite, countPatientsInTrial, findPatient, findPatientById, findPatientByStudyId, findPatientsByIds, listAttentionCandidates, listPatientsOfTrial, listPatientsWithAssessments, storeDerivations, storeDerivedOutcomes } from './patients.repository.js';
export type { OutcomeColumns, Patient } from './patients.repository.js';
export { patientsRoutes } from './patients.routes.js';
export { attestationMeaning } from './patients.schema.js';
