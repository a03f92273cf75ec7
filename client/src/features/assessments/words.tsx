/** How the derivation's roles and attention kinds read on screen: a word with its glyph (from the words module), never colour alone. */
import { GLYPHS, OUTCOME_WORDS, type Worded } from '../../../../server/words';
import type { AttentionKind, DerivationStep } from './types';

export const STEP_WORDS: Record<DerivationStep['role'], Worded> = {
  'made-response': { label: 'Made the response', glyph: GLYPHS.madeResponse },
  confirmed: { label: 'Confirmed it', glyph: GLYPHS.done },
  supporting: { label: 'Within the response', glyph: GLYPHS.withinResponse },
  unconfirmed: { label: 'Not confirmed', glyph: GLYPHS.notConfirmed },
  'awaiting-confirmation': { label: 'Awaits confirmation', glyph: GLYPHS.pending },
  stable: { label: 'Stable disease', glyph: GLYPHS.unchanged },
  'too-early-for-sd': { label: 'Too early for SD', glyph: GLYPHS.tooEarly },
  progression: { label: 'Progression', glyph: GLYPHS.progression },
  'not-evaluable': { label: 'Not evaluable', glyph: GLYPHS.notEvaluable },
  ignored: { label: 'After progression', glyph: GLYPHS.afterProgression },
  'before-enrolment': { label: 'Before enrolment', glyph: GLYPHS.warning },
};

export const ATTENTION_WORDS: Record<AttentionKind, Worded> = {
  'unconfirmed-past-window': { label: 'Confirmation overdue', glyph: GLYPHS.overdue },
  'sd-before-minimum': { label: 'SD before the minimum', glyph: GLYPHS.tooEarly },
  'assessment-before-enrolment': { label: 'Dated before enrolment', glyph: GLYPHS.warning },
  'gap-longer-than-schedule': { label: 'Gap longer than the schedule', glyph: GLYPHS.gap },
  'entered-disagrees': { label: 'Entered ≠ derived', glyph: GLYPHS.disagrees },
};

/** A derived responder status; null while the derivation is still pending. */
export function responderWords(responder: boolean | null): Worded {
  if (responder === null) return OUTCOME_WORDS.pending;
  return responder ? OUTCOME_WORDS.responder : OUTCOME_WORDS.non_responder;
}

export function Tag({ label, glyph }: Worded) {
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-ink-300 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap text-ink-700">
      <span aria-hidden>{glyph}</span>
      {label}
    </span>
  );
}
