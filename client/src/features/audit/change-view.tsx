/** An audit entry's before and after, shown field by field as "old → new" rather than raw JSON; stored codes read in words. */
import { storedValueWords } from '../../../../server/words';

const words = (key: string) => key.replace(/_/g, ' ').replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();

/** A value stored under `field`: a code of a known field in its words (a list of codes under a plural field name, each). */
function show(value: unknown, field = ''): string {
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  // Lists of records (a trial's sites, say) read as "code RVG, planned accrual per month 2; …".
  if (Array.isArray(value)) return value.length === 0 ? 'none' : value.map((item) => show(item, field.replace(/s$/, ''))).join('; ');
  if (typeof value === 'object') {
    return Object.entries(value as Record<string, unknown>)
      .map(([key, inner]) => `${words(key)} ${show(inner, key)}`)
      .join(', ');
  }
  return typeof value === 'string' ? storedValueWords(field, value) : JSON.stringify(value);
}

const asRecord = (value: unknown): Record<string, unknown> | undefined =>
  value && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : undefined;

export function ChangeView({ before, after }: { before: unknown; after: unknown }) {
  const b = asRecord(before);
  const a = asRecord(after);
  if (!b && !a) return before === null && after === null ? <span className="text-ink-400">—</span> : <span>{show(before)} → {show(after)}</span>;
  const keys = [...new Set([...Object.keys(b ?? {}), ...Object.keys(a ?? {})])];
  const changed = keys.filter((key) => !b || !a || JSON.stringify(b[key]) !== JSON.stringify(a[key]));
  if (changed.length === 0) return <span className="text-ink-400">no field changed</span>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-2 text-xs">
      {changed.map((key) => (
        <div key={key} className="contents">
          <dt className="text-ink-500">{words(key)}</dt>
          <dd className="break-words">
            {b && a ? (
              <>
                <del className="text-ink-500">{show(b[key], key)}</del>
                <span aria-label="changed to"> → </span>
                <ins className="no-underline font-semibold">{show(a[key], key)}</ins>
              </>
            ) : (
              show((a ?? b)?.[key], key)
            )}
          </dd>
        </div>
      ))}
    </dl>
  );
}
