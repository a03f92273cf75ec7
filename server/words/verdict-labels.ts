/**
 * A rule's verdict as a short label with its glyph, the same on the Trial overview, the data cut's
 * page and the report. The sentences that explain a verdict are worded beside the computation
 * (verdicts); these are the names they carry.
 */
import type { InterimDecision, InterimStage, Verdict } from '../stats/index.js';
import { GLYPHS, type Worded } from './glyphs.js';

export const VERDICT_WORDS: Record<InterimDecision, Worded> = {
  continue: { label: 'Stage 1 passed', glyph: GLYPHS.stage2 },
  'stop-futility': { label: 'Futility rule met', glyph: GLYPHS.futility },
  promising: { label: 'Promising', glyph: GLYPHS.promising },
  'not-promising': { label: 'Not promising', glyph: GLYPHS.notPromising },
  undetermined: { label: 'Not yet decided', glyph: GLYPHS.pending },
};

/** Which rule the verdict comes from. */
export const RULE_STAGE_LABELS: Record<InterimStage, string> = {
  stage1: 'Stage-1 rule',
  stage2: 'Final rule',
  single: 'Single-stage rule',
};

/** Said beside a verdict settled before its last patient. */
export const SETTLED_EARLY = 'settled early';

/** The name of the rule a verdict was reached by, e.g. "Final rule (final analysis)". */
export function ruleLabel(rule: Pick<Verdict, 'applied' | 'look'>, singleStage: boolean): string {
  if (rule.applied === 'stage1') return RULE_STAGE_LABELS.stage1;
  const name = RULE_STAGE_LABELS[singleStage ? 'single' : 'stage2'];
  return rule.look === 'final' ? `${name} (final analysis)` : name;
}
