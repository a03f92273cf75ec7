/** The cautions shown wherever a result is shown (pages, mail, the report), and beside each decision point. */
export const DECISION_SUPPORT_ONLY =
  'Decision support only: stopping and continuation decisions belong to the trial statistician, the data monitoring committee and the ethics board, under the protocol and local regulations.';
export const INTERIM_DATA = 'Interim figures use data that may not yet be cleaned or source-verified.';
export const NAIVE_ESTIMATES = 'Naive estimates after a two-stage design are biased.';
export const SIZE_DEVIATION = 'A deviation from the planned n1 or n changes the operating characteristics.';

/** All four, in this order, beside every evaluation and analysis. */
export const CAUTIONS: readonly string[] = [DECISION_SUPPORT_ONLY, INTERIM_DATA, NAIVE_ESTIMATES, SIZE_DEVIATION];

/** The report's running footer: the decision-support caution, short enough for one line. */
export const REPORT_FOOTER_CAUTION =
  'Decision support only: the decision belongs to the trial statistician, the data monitoring committee and the ethics board.';

/** What each decision point says next to its button: the act is the person's, under the protocol. */
export const DECISION_POINT_CAUTIONS = {
  applyDecision:
    'Applying moves the cohort and tells the sites and the sponsor. Apply only what the data monitoring committee recommended and the protocol allows; the figures support the decision, they do not make it.',
  stopCohort:
    'Stopping closes enrolment in this cohort at once. Stop only as the protocol, the data monitoring committee or the ethics board require; follow the protocol for patients on treatment.',
  signRecommendation:
    'Your signature records the committee’s judgement, not the tool’s: the figures may rest on data not yet cleaned or source-verified, and the decision stays with the trial statistician, the committee and the ethics board.',
  recommendationSigned:
    'A signed recommendation is not yet a decision: the trial statistician applies it under the protocol, with the data monitoring committee and the ethics board.',
} as const;
