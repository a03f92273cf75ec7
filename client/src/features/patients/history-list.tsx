/** A patient's audit trail: who changed what, when, from what to what, and why. */
import { EmptyState, ErrorNotice, Loading } from '../../components/ui';
import { dateTime } from '../../lib/format';
import { usePatientHistory } from './get-patient-history';
import { storedValueWords } from '../../../../server/words';
import { FIELD_LABELS } from './words';

const ACTION_WORDS: Record<string, string> = {
  enrolled: 'Enrolled',
  outcome_recorded: 'Outcome recorded',
  outcome_corrected: 'Outcome corrected',
  outcome_attested: 'Outcome attested',
};

const show = (value: unknown, field: string) =>
  value === null || value === undefined ? '—' : value === true ? 'Yes' : value === false ? 'No' : typeof value === 'string' ? storedValueWords(field, value) : JSON.stringify(value);

function changes(before: unknown, after: unknown): Array<[string, unknown, unknown]> {
  const b = (before ?? {}) as Record<string, unknown>;
  const a = (after ?? {}) as Record<string, unknown>;
  return Object.keys(FIELD_LABELS)
    .filter((key) => key in a && (before === null || b[key] !== a[key]))
    .map((key) => [key, b[key], a[key]]);
}

export function HistoryList({ trialId, patientId }: { trialId: string; patientId: string }) {
  const { data: entries, isPending, error } = usePatientHistory(trialId, patientId);
  if (isPending) return <Loading label="Loading the history" />;
  if (error) return <ErrorNotice error={error} />;
  if (entries.length === 0) return <EmptyState>No changes recorded yet.</EmptyState>;
  return (
    <ol className="grid gap-3 text-sm">
      {entries.map((entry) => (
        <li key={entry.id} className="border-l-2 border-ink-200 pl-3">
          <p>
            <span className="font-semibold">{ACTION_WORDS[entry.action] ?? entry.action.replace(/_/g, ' ')}</span>
            <span className="text-ink-500">
              {' '}
              · {dateTime(entry.at)} · {entry.actor.name ?? entry.actor.email ?? 'system'}
            </span>
          </p>
          {changes(entry.before, entry.after).length > 0 && (
            <ul className="mt-1 text-xs text-ink-700">
              {changes(entry.before, entry.after).map(([key, from, to]) => (
                <li key={key} className="tabular-nums">
                  {FIELD_LABELS[key]}: {entry.before ? <>{show(from, key)} → </> : null}
                  <strong>{show(to, key)}</strong>
                </li>
              ))}
            </ul>
          )}
          {(entry.after as { attestationCleared?: boolean } | null)?.attestationCleared && <p className="text-xs text-ink-600">The attestation was cleared by this change.</p>}
          {entry.reason && <p className="mt-1 text-xs text-ink-700">Reason: {entry.reason}</p>}
        </li>
      ))}
    </ol>
  );
}
