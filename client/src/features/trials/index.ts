/**
 * What other features use of Trial set-up: the trial record, and the trial a trial page sits in.
 * The app's first load imports this file (the trial layout, the Trial overview): keep it to
 * queries and types, so no set-up form reaches the initial bundle.
 */
export { trialQueryOptions, useTrial, type Cohort, type Trial, type TrialSite } from './get-trial';
export { trialsQueryOptions } from './get-trials';
export { useTrialContext } from './use-trial-context';
