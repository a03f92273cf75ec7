/**
 * One glyph per meaning, across the product: a status, a verdict, an outcome or a warning is always
 * the same sign, and a sign never means two things. Every glyph here is drawn by the shipped Inter
 * font (the browser test and the PDF test check it), so none falls back to an empty box. A glyph
 * goes beside a word, never instead of it.
 */
export const GLYPHS = {
  draft: '◇',
  enrollingStage1: '▷',
  paused: '‖',
  stage2: '▶',
  finalAnalysis: '∑',
  done: '✓',
  stopped: '■',
  futility: '▼',
  promising: '▲',
  notPromising: '▽',
  pending: '…',
  responder: '●',
  nonResponder: '○',
  notEvaluable: '⊘',
  warning: '⚠',
  change: '↻',
  restored: '↩',
  disagrees: '≠',
  mixed: '⁂',
  settledEarly: '◆',
  progression: '↗',
  madeResponse: '★',
  withinResponse: '◦',
  notConfirmed: '✗',
  unchanged: '=',
  tooEarly: '‹',
  overdue: '!',
  gap: '↔',
  afterProgression: '⊖',
  added: '+',
  note: '※',
  download: '⤓',
  back: '←',
  sortAscending: '↑',
  sortDescending: '↓',
  sortable: '↕',
} as const;

export type GlyphMeaning = keyof typeof GLYPHS;

/** What each glyph means, as the glossary page lists it. */
export const GLYPH_MEANINGS: Record<GlyphMeaning, string> = {
  draft: 'Not yet locked or signed: a cohort in draft, an outcome not yet attested',
  enrollingStage1: 'Enrolling stage 1',
  paused: 'Accrual paused for the interim review',
  stage2: 'On to stage 2: stage 1 passed, continue or resume accrual for stage 2, enrolling stage 2',
  finalAnalysis: 'The final analysis',
  done: 'Done: completed, confirmed, signed, saved or applied',
  stopped: 'Stopped, or a stop for a reason other than futility',
  futility: 'Futility: the stage-1 futility rule met, a stop for futility',
  promising: 'Promising: more responders than the final threshold',
  notPromising: 'Not promising: the final threshold not passed',
  pending: 'Not known yet: a pending outcome, a rule not yet decided, something still awaited',
  responder: 'Responder (CR or PR)',
  nonResponder: 'Non-responder (SD, PD or NE)',
  notEvaluable: 'Not evaluable',
  warning: 'Needs attention: an error, a date before enrolment, a copy that no longer matches its hash',
  change: 'A change: modify the protocol, an updated or corrected row',
  restored: 'Your form as you left it, after signing in again',
  disagrees: 'Differs: the entered outcome disagrees with the derived one, or someone else changed a field',
  mixed: 'The cohorts of the trial are at different points',
  settledEarly: 'A rule settled early, before its last patient',
  progression: 'Progression (PD) in the timeline',
  madeResponse: 'The assessment that made the response',
  withinResponse: 'An assessment within the response',
  notConfirmed: 'A response not confirmed',
  unchanged: 'Unchanged: stable disease, a row that changes nothing',
  tooEarly: 'Too early: stable disease before its minimum duration',
  overdue: 'Overdue: a confirmation past its window',
  gap: 'A gap between assessments longer than the schedule',
  afterProgression: 'After progression: left out of the response',
  added: 'A new record',
  note: 'A note to read before using the figures',
  download: 'Download',
  back: 'Back to the list',
  sortAscending: 'Sorted, smallest first',
  sortDescending: 'Sorted, largest first',
  sortable: 'Sortable column',
};

/** A label with its glyph: the way a status, verdict, outcome or decision is shown. */
export type Worded = { label: string; glyph: string };
