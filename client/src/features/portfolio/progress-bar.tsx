import type { Progress } from './get-portfolio';
import { GLYPHS } from '../../../../server/words';

/** Enrolment against a target: the figures as text (what screen readers read) beside a bar drawn for the eye. */
export function ProgressBar({ label, progress }: { label: string; progress: Progress | null }) {
  if (!progress) return <span className="text-xs text-ink-400">{label} —</span>;
  const done = progress.counted >= progress.target;
  return (
    <div className="flex min-w-36 items-center gap-2 text-xs">
      <span className="w-6 text-ink-500">{label}</span>
      <span aria-hidden className="relative h-2 flex-1 bg-ink-100">
        <span className={`absolute inset-y-0 left-0 ${done ? 'bg-ink-700' : 'bg-brass-500'}`} style={{ width: `${Math.round(progress.fraction * 100)}%` }} />
      </span>
      <span className="w-14 text-right tabular-nums">
        {progress.counted} / {progress.target}
        {done && <span aria-hidden> {GLYPHS.done}</span>}
        <span className="sr-only">{done ? ' reached' : ` enrolled toward ${label}`}</span>
      </span>
    </div>
  );
}
