/** What other features use of Accrual: its keys, since enrolment and outcomes change its counts. */
export { accrualKeys } from './query-keys';
