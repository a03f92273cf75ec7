/** A stale edit (409): what the user entered beside the record as it now stands, and a choice. */
import { Button } from '../../components/ui';
import { OUTCOME_FIELDS } from '../../../../server/patients/patients.schema';
import type { Patient } from './types';
import { FIELD_LABELS, OUTCOME_WORDS } from './words';
import { GLYPHS } from '../../../../server/words';

type Entry = Record<(typeof OUTCOME_FIELDS)[number], unknown>;

const show = (value: unknown) => {
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'boolean') return value ? 'Yes' : 'No';
  // Outcomes read as the words the rest of the page uses, not their stored codes.
  return OUTCOME_WORDS[value as keyof typeof OUTCOME_WORDS]?.label ?? (typeof value === 'string' ? value : JSON.stringify(value));
};

export function ConflictView({ mine, loaded, current, onReload, onKeepMine }: { mine: Entry; loaded: Patient; current: Patient; onReload: () => void; onKeepMine: () => void }) {
  return (
    <div role="alert" className="grid gap-3 border-l-4 border-brass-500 bg-brass-50 px-4 py-3 text-sm text-ink-800">
      <p className="font-semibold">
        <span aria-hidden>{GLYPHS.warning} </span>Someone saved this patient while you were editing (now version {current.version}). Nothing of yours was saved.
      </p>
      <table className="w-full text-left">
        <caption className="sr-only">Your entry beside the current record</caption>
        <thead className="text-xs tracking-wide text-ink-500 uppercase">
          <tr>
            <th className="py-1 pr-4">Field</th>
            <th className="py-1 pr-4">When you opened it</th>
            <th className="py-1 pr-4">Current record</th>
            <th className="py-1">Your entry</th>
          </tr>
        </thead>
        <tbody>
          {OUTCOME_FIELDS.map((field) => {
            const changedByOther = loaded[field] !== current[field];
            return (
              <tr key={field} className="border-t border-brass-200">
                <th scope="row" className="py-1 pr-4 font-medium">
                  {FIELD_LABELS[field]}
                </th>
                <td className="py-1 pr-4 tabular-nums">{show(loaded[field])}</td>
                <td className={`py-1 pr-4 tabular-nums ${changedByOther ? 'font-semibold' : ''}`}>
                  {changedByOther && <span aria-hidden>{GLYPHS.disagrees} </span>}
                  {show(current[field])}
                  {changedByOther && <span className="sr-only"> (changed by someone else)</span>}
                </td>
                <td className="py-1 tabular-nums">{show(mine[field])}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <div className="flex flex-wrap gap-2">
        <Button onClick={onReload}>Reload the current record</Button>
        <Button variant="secondary" onClick={onKeepMine}>
          Keep my entry and check it against the current record
        </Button>
      </div>
    </div>
  );
}
