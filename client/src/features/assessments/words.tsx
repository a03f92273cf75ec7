/** How the derivation's roles and attention kinds read on screen: a word with an icon, never colour alone. */
import type { AttentionKind, DerivationStep } from './types';

export const STEP_WORDS: Record<DerivationStep['role'], { label: string; icon: string }> = {
  'made-response': { label: 'Made the response', icon: '▸' },
  confirmed: { label: 'Confirmed it', icon: '✓' },
  supporting: { label: 'Within the response', icon: '·' },
  unconfirmed: { label: 'Not confirmed', icon: '✗' },
  'awaiting-confirmation': { label: 'Awaits confirmation', icon: '…' },
  stable: { label: 'Stable disease', icon: '=' },
  'too-early-for-sd': { label: 'Too early for SD', icon: '‹' },
  progression: { label: 'Progression', icon: '▲' },
  'not-evaluable': { label: 'Not evaluable', icon: '?' },
  ignored: { label: 'After progression', icon: '–' },
  'before-enrolment': { label: 'Before enrolment', icon: '⚠' },
};

export const ATTENTION_WORDS: Record<AttentionKind, { label: string; icon: string }> = {
  'unconfirmed-past-window': { label: 'Confirmation overdue', icon: '!' },
  'sd-before-minimum': { label: 'SD before the minimum', icon: '‹' },
  'assessment-before-enrolment': { label: 'Dated before enrolment', icon: '⚠' },
  'gap-longer-than-schedule': { label: 'Gap longer than the schedule', icon: '↔' },
  'entered-disagrees': { label: 'Entered ≠ derived', icon: '⚑' },
};

export function responderWords(responder: boolean | null): { label: string; icon: string } {
  if (responder === null) return { label: 'Pending', icon: '…' };
  return responder ? { label: 'Responder', icon: '✓' } : { label: 'Non-responder', icon: '✗' };
}

export function Tag({ label, icon }: { label: string; icon: string }) {
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-ink-300 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap text-ink-700">
      <span aria-hidden>{icon}</span>
      {label}
    </span>
  );
}
