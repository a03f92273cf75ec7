/** What other features use of patients: their keys, and those of the figures counted over them (assessments change both). */
export { patientFigureKeys, patientKeys } from './query-keys';
