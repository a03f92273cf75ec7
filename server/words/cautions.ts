/** The cautions shown wherever a result is shown (pages, mail, the report). */
export const DECISION_SUPPORT_ONLY =
  'Decision support only: stopping and continuation decisions belong to the trial statistician, the data monitoring committee and the ethics board, under the protocol and local regulations.';
export const INTERIM_DATA = 'Interim figures use data that may not yet be cleaned or source-verified.';
export const NAIVE_ESTIMATES = 'Naive estimates after a two-stage design are biased.';
export const SIZE_DEVIATION = 'A deviation from the planned n1 or n changes the operating characteristics.';

/** All four, in this order, beside every evaluation and analysis. */
export const CAUTIONS: readonly string[] = [DECISION_SUPPORT_ONLY, INTERIM_DATA, NAIVE_ESTIMATES, SIZE_DEVIATION];
