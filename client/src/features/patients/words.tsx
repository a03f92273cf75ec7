/** Outcomes and row results as words with a glyph (from the words module), never colour alone. */
import type { Outcome } from '../../../../server/patients/patients.schema';
import { GLYPHS, OUTCOME_WORDS, type Worded } from '../../../../server/words';
import { Glyphed } from '../../components/ui';

export { OUTCOME_WORDS, RESPONSE_LABELS as RESPONSE_WORDS } from '../../../../server/words';

export function OutcomeTag({ outcome }: { outcome: Outcome }) {
  return (
    <span className="inline-flex items-center gap-1 whitespace-nowrap">
      <Glyphed word={OUTCOME_WORDS[outcome]} />
    </span>
  );
}

export const ROW_RESULT_WORDS: Record<string, Worded> = {
  new: { label: 'New patient', glyph: GLYPHS.added },
  update: { label: 'Update', glyph: GLYPHS.change },
  unchanged: { label: 'Unchanged', glyph: GLYPHS.unchanged },
  error: { label: 'Error', glyph: GLYPHS.warning },
};

export const FIELD_LABELS: Record<string, string> = {
  outcome: 'Outcome',
  bestOverallResponse: 'Best overall response',
  responseAssessedOn: 'Assessment date',
  evaluable: 'Evaluable',
  notEvaluableReason: 'Reason not evaluable',
};
