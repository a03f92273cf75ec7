/** What other features use of the Trial overview: its keys, since enrolment and outcomes change the evaluation. */
export { overviewKeys } from './query-keys';
