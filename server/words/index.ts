/**
 * The words module: how codes and numbers read to a person — statuses, stop categories,
 * recommendations and decisions, roles, responses, adverse events and safety rules, counts and the
 * standing cautions. Pure (no Node or server-only imports), so the server's pages, mail and report
 * and the client all word a thing the same way. Features compute numbers and states; they take
 * their words from here.
 */
export { plural } from './counts.js';
export { POPULATION_IN_A_SENTENCE, STATUS_IN_A_SENTENCE, STATUS_LABELS, STOP_CATEGORY_LABELS, STOPPED_FOR } from './trial-life.js';
export { DECISION_LABELS, RECOMMENDATION_LABELS } from './decisions.js';
export { ROLE_WORDS } from './people.js';
export { RESPONSE_LABELS, responderWords } from './outcomes.js';
export {
  ATTRIBUTION_WORDS,
  attributionText,
  CTCAE_SOURCE,
  crossingSentence,
  describeJointVerdict,
  describeSafetyState,
  eventAwaitsAssessment,
  frozenEventsMissing,
  SAFETY_ATTENTION_WORDS,
  seriousEventUnattested,
  toxicityWindowClosing,
  responseOnlySafety,
  type JointVerdict,
  EVENT_OUTCOME_WORDS,
  GRADE_WORDS,
  gradeText,
  SAFETY_PAUSED,
  safetyPauseReason,
  SAFETY_RULE_WORDS,
  TOXICITY_STATUS_WORDS,
  toxicityDefinitionSentence,
} from './safety.js';
export { CAUTIONS, DECISION_SUPPORT_ONLY, INTERIM_DATA, NAIVE_ESTIMATES, SIZE_DEVIATION } from './cautions.js';
export { liveFiguresHidden, releasedAsOf, type HiddenAudience } from './visibility.js';
