/**
 * The words module: how codes and numbers read to a person — statuses, stop categories, verdicts,
 * recommendations and decisions, roles, outcomes, counts, the glossary, the standing cautions and
 * one glyph per meaning. Pure (no Node or server-only imports), so the server's pages, mail and
 * report and the client all word a thing the same way. Features compute numbers and states; they
 * take their words from here. One file per topic:
 *
 * - glyphs.ts — the one glyph of each meaning, and what it means;
 * - trial-life.ts — statuses, stop categories, the analysis population;
 * - designs.ts — the kinds of design and the protocol's settings;
 * - stored-values.ts — a stored code in a change history, in words;
 * - verdict-labels.ts — a rule's verdict as a label;
 * - verdicts.ts — the one verdict's rule, method and sentences (the engine's cohortVerdict in words);
 * - decisions.ts — recommendations, decisions and the wording of a recommendation's signature;
 * - data-cuts.ts — cut kinds and open data issues;
 * - outcomes.ts — outcomes, evaluability, timepoint responses;
 * - people.ts — roles as people say them;
 * - counts.ts — counts, the names of the denominators and the glossary;
 * - cautions.ts — the standing cautions and those beside each decision point;
 * - safety.ts — adverse events (CTCAE grades, attribution, outcome), the toxicity definition, the
 *   safety rules' states, the joint verdict and safety's Needs attention items.
 */
export { GLYPHS, GLYPH_MEANINGS, type GlyphMeaning, type Worded } from './glyphs.js';
export {
  POPULATION_COUNTS,
  POPULATION_IN_A_SENTENCE,
  STATUS_IN_A_SENTENCE,
  STATUS_WORDS,
  STOP_CATEGORY_LABELS,
  STOPPED_FOR,
  stoppedFor,
  type TrialStatus,
} from './trial-life.js';
export { INTERIM_ACCRUAL_LABELS, NE_BETWEEN_RESPONSES_LABELS, OUTCOME_SOURCE_LABELS, POPULATION_LABELS, SELECTION_LABELS } from './designs.js';
export { storedValueWords, storedValuesWords } from './stored-values.js';
export { RULE_STAGE_LABELS, SETTLED_EARLY, VERDICT_WORDS, ruleLabel } from './verdict-labels.js';
export { CHOICE_NOT_MADE, DECISION_WORDS, RECOMMENDATION_WORDS, recommendationMeaning } from './decisions.js';
export { CUT_KIND_LABELS, METHOD_NAMES, OPEN_ISSUE_WORDS } from './data-cuts.js';
export { EVALUABILITY_WORDS, OUTCOME_WORDS, RESPONSE_LABELS, responderWords } from './outcomes.js';
export { ROLE_LABELS, ROLE_WORDS } from './people.js';
export { COUNT_LABELS, GLOSSARY, plural } from './counts.js';
export { SENSITIVITY_LABEL, VERDICT_FIGURE_LABELS, VERDICT_METHODS, VERDICT_RULES, atRiskSentence, sensitivityDisagreement, stillOpen, verdictSentence } from './verdicts.js';
export {
  CAUTIONS,
  DECISION_POINT_CAUTIONS,
  DECISION_SUPPORT_ONLY,
  INTERIM_DATA,
  NAIVE_ESTIMATES,
  REPORT_FOOTER_CAUTION,
  SIZE_DEVIATION,
} from './cautions.js';
export {
  ATTRIBUTION_WORDS,
  attributionText,
  CTCAE_SOURCE,
  crossingSentence,
  describeJointVerdict,
  describeSafetyState,
  eventAwaitsAssessment,
  EVENT_OUTCOME_WORDS,
  frozenEventsMissing,
  GRADE_WORDS,
  gradeText,
  responseOnlySafety,
  SAFETY_ATTENTION_WORDS,
  SAFETY_PAUSED,
  safetyPauseReason,
  SAFETY_RULE_WORDS,
  seriousEventUnattested,
  TOXICITY_STATUS_WORDS,
  toxicityDefinitionSentence,
  toxicityWindowClosing,
  type JointVerdict,
} from './safety.js';
export { liveFiguresHidden, releasedAsOf, type HiddenAudience, type HiddenFigures } from './visibility.js';
