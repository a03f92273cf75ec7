/** Outcomes and row results as words with an icon, never colour alone. */
import type { Outcome } from '../../../../server/patients/patients.schema';

export const OUTCOME_WORDS: Record<Outcome, { label: string; icon: string }> = {
  pending: { label: 'Pending', icon: '…' },
  responder: { label: 'Responder', icon: '▲' },
  non_responder: { label: 'Non-responder', icon: '▽' },
};

export const RESPONSE_WORDS: Record<string, string> = {
  CR: 'CR — complete response',
  PR: 'PR — partial response',
  SD: 'SD — stable disease',
  PD: 'PD — progressive disease',
  NE: 'NE — not evaluable',
};

export function OutcomeTag({ outcome }: { outcome: Outcome }) {
  const word = OUTCOME_WORDS[outcome];
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap">
      <span aria-hidden className="text-ink-400">
        {word.icon}
      </span>
      {word.label}
    </span>
  );
}

export const ROW_RESULT_WORDS: Record<string, { label: string; icon: string }> = {
  new: { label: 'New patient', icon: '+' },
  update: { label: 'Update', icon: '✎' },
  unchanged: { label: 'Unchanged', icon: '=' },
  error: { label: 'Error', icon: '⚠' },
};

export const FIELD_LABELS: Record<string, string> = {
  outcome: 'Outcome',
  bestOverallResponse: 'Best overall response',
  responseAssessedOn: 'Assessment date',
  evaluable: 'Evaluable',
  notEvaluableReason: 'Reason not evaluable',
};
