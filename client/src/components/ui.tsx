/** Small shared building blocks in Orrery's look: ink navy, one brass accent, dense and print-like. */
import type { ButtonHTMLAttributes, ReactNode } from 'react';
import { ApiError } from '../lib/api';
import { CAUTIONS, GLYPHS, SAFETY_PAUSED, STATUS_WORDS, type TrialStatus, type Worded } from '../../../server/words';

export function Button({
  variant = 'primary',
  className = '',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: 'primary' | 'secondary' | 'quiet' | 'danger' }) {
  const styles = {
    primary: 'bg-ink-900 text-white hover:bg-ink-700 disabled:bg-ink-300',
    secondary: 'border border-ink-300 bg-white text-ink-900 hover:border-ink-500 disabled:text-ink-300',
    quiet: 'text-ink-700 underline-offset-2 hover:underline disabled:text-ink-300',
    danger: 'bg-alert-600 text-white hover:bg-red-800 disabled:bg-ink-300',
  }[variant];
  return (
    <button
      type="button"
      className={`inline-flex items-center gap-2 rounded-sm px-3 py-1.5 text-sm font-semibold disabled:cursor-not-allowed ${styles} ${className}`}
      {...props}
    />
  );
}

export function Panel({ title, actions, children, className = '' }: { title?: ReactNode; actions?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <section className={`border border-ink-100 bg-white ${className}`}>
      {(title || actions) && (
        <header className="flex items-center justify-between gap-4 border-b border-ink-100 px-4 py-2.5">
          {title && <h2 className="text-sm font-semibold tracking-wide text-ink-900 uppercase">{title}</h2>}
          {actions}
        </header>
      )}
      <div className="p-4">{children}</div>
    </section>
  );
}

export function PageHeader({ title, subtitle, actions }: { title: ReactNode; subtitle?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-5 flex flex-wrap items-end justify-between gap-4 border-b border-ink-200 pb-3">
      <div>
        <h1 className="text-2xl font-semibold text-ink-950">{title}</h1>
        {subtitle && <p className="mt-1 text-sm text-ink-500">{subtitle}</p>}
      </div>
      {actions && <div className="flex gap-2">{actions}</div>}
    </div>
  );
}

export function Spinner({ label = 'Loading' }: { label?: string }) {
  return (
    <span role="status" className="inline-flex items-center gap-2 text-sm text-ink-500">
      <span aria-hidden className="h-4 w-4 animate-spin rounded-full border-2 border-ink-200 border-t-brass-500" />
      {label}…
    </span>
  );
}

export function Loading({ label }: { label?: string }) {
  return (
    <div className="flex min-h-32 items-center justify-center">
      <Spinner label={label} />
    </div>
  );
}

export function ErrorNotice({ error, title = 'Something went wrong' }: { error: unknown; title?: string }) {
  const message = error instanceof Error ? error.message : String(error);
  const fields = error instanceof ApiError ? Object.entries(error.fields) : [];
  return (
    <div role="alert" className="border-l-4 border-alert-600 bg-alert-50 px-4 py-3 text-sm text-alert-600">
      <p className="font-semibold">
        <span aria-hidden>{GLYPHS.warning} </span>
        {title}
      </p>
      <p>{message}</p>
      {fields.length > 0 && (
        <ul className="mt-1 list-disc pl-5">
          {fields.map(([field, reason]) => (
            <li key={field}>
              <strong>{field}</strong>: {reason}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

/** The cautions shown wherever a result is shown: the tool supports decisions, it does not make them. */
export function Cautions({ items = CAUTIONS }: { items?: readonly string[] }) {
  return (
    <aside aria-label="Cautions" className="border border-brass-200 bg-brass-50 px-4 py-3 text-xs leading-relaxed text-ink-700">
      <p className="mb-1 font-semibold tracking-wide text-brass-700 uppercase">Read with care</p>
      <ul className="list-disc space-y-0.5 pl-4">
        {items.map((item) => (
          <li key={item}>{item}</li>
        ))}
      </ul>
    </aside>
  );
}

/** A figure with its label, large tabular numerals. */
export function Figure({ label, value, hint }: { label: string; value: ReactNode; hint?: ReactNode }) {
  return (
    <div className="min-w-28">
      <div className="text-xs font-medium tracking-wide text-ink-500 uppercase">{label}</div>
      <div className="text-2xl font-semibold text-ink-950 tabular-nums">{value}</div>
      {hint && <div className="text-xs text-ink-500">{hint}</div>}
    </div>
  );
}

/** A label with its glyph (from the words module): a word with an icon, never colour alone. */
export function Glyphed({ word }: { word: Worded }) {
  return (
    <>
      <span aria-hidden>{word.glyph} </span>
      {word.label}
    </>
  );
}

/** The caution beside a decision point's button: the act is the person's, under the protocol. */
export function DecisionCaution({ children }: { children: ReactNode }) {
  return (
    <p role="note" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-xs text-ink-800">
      <span aria-hidden>{GLYPHS.note} </span>
      {children}
    </p>
  );
}

/** A status is a word with an icon, never colour alone. */
export function StatusTag({ status }: { status: TrialStatus }) {
  const tone = status === 'stopped' ? 'border-alert-600 text-alert-600' : status === 'interim_review' ? 'border-brass-500 text-brass-700' : 'border-ink-300 text-ink-700';
  return (
    <span className={`inline-flex items-center gap-1 rounded-sm border px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap ${tone}`}>
      <Glyphed word={STATUS_WORDS[status]} />
    </span>
  );
}

/** Beside a cohort's status: its accrual is paused because its safety rule was crossed. */
export function SafetyPauseTag() {
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-alert-600 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap text-alert-600">
      <span aria-hidden>{GLYPHS.paused}</span>
      {SAFETY_PAUSED}
    </span>
  );
}

export function EmptyState({ children }: { children: ReactNode }) {
  return <p className="py-6 text-center text-sm text-ink-500">{children}</p>;
}
