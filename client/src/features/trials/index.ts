/**
 * What other features use of Trial set-up: the trial record, the trial a trial page sits in, and
 * the keys every trial's queries build on. The app's first load imports this file (the trial
 * layout, the Trial overview): keep it to queries, keys and types, so no set-up form reaches the
 * initial bundle.
 */
export { useTrial, type Trial, type TrialSite } from './get-trial';
export { trialKeys, wholeTrialKeys } from './query-keys';
export { useTrialContext } from './use-trial-context';
