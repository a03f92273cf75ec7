/** How grades, attributions, outcomes and toxicity statuses read on screen: words with an icon, never colour alone. */
import type { ReactNode } from 'react';
import { ATTRIBUTION_WORDS, EVENT_OUTCOME_WORDS, GLYPHS, GRADE_WORDS, TOXICITY_STATUS_WORDS } from '../../../../server/words';
import type { Attribution, EventOutcome, ToxicityStatus } from '../../../../server/safety/safety.schema';

export { ATTRIBUTION_WORDS, EVENT_OUTCOME_WORDS, GRADE_WORDS };

const STATUS_ICONS: Record<ToxicityStatus, string> = { toxic: GLYPHS.toxicity, not_toxic: GLYPHS.noToxicity, not_assessable: GLYPHS.pending };

function Tag({ icon, children, strong = false }: { icon: string; children: ReactNode; strong?: boolean }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded-sm border px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap ${strong ? 'border-alert-600 text-alert-600' : 'border-ink-300 text-ink-700'}`}>
      <span aria-hidden>{icon}</span>
      {children}
    </span>
  );
}

export function ToxicityStatusTag({ status }: { status: ToxicityStatus }) {
  return (
    <Tag icon={STATUS_ICONS[status]} strong={status === 'toxic'}>
      {TOXICITY_STATUS_WORDS[status]}
    </Tag>
  );
}

/** "3 · Severe"; "Not graded" when the grade is missing. */
export function GradeText({ grade }: { grade: number | null }) {
  if (grade === null) return <span className="text-ink-500">Not graded</span>;
  return (
    <span className="whitespace-nowrap tabular-nums">
      <strong>{grade}</strong> · {GRADE_WORDS[grade]}
    </span>
  );
}

export const attributionLabel = (attribution: Attribution | null) => (attribution ? ATTRIBUTION_WORDS[attribution] : 'Not assessed');
export const outcomeLabel = (outcome: EventOutcome) => EVENT_OUTCOME_WORDS[outcome];

export function SeriousTag({ serious }: { serious: boolean }) {
  return serious ? <Tag icon="✚" strong>Serious</Tag> : <span className="text-xs text-ink-500">Not serious</span>;
}
