/** A labelled Formik field with its validation message, for every form in the app. */
import { useField } from 'formik';
import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes, TextareaHTMLAttributes } from 'react';
import { GLYPHS } from '../../../server/words';

type Common = { name: string; label: ReactNode; hint?: ReactNode };

function Frame({ name, label, hint, error, children }: Common & { error?: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={name} className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
        {label}
      </label>
      {children}
      {hint && !error && (
        <p id={`${name}-hint`} className="text-xs text-ink-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${name}-error`} role="alert" className="text-xs font-medium text-alert-600">
          <span aria-hidden>{GLYPHS.warning} </span>
          {error}
        </p>
      )}
    </div>
  );
}

/** Screen readers announce the field's message: its error when there is one, else its hint. */
const describedBy = (name: string, error: string | undefined, hint: ReactNode) => (error ? `${name}-error` : hint ? `${name}-hint` : undefined);

const inputClass = 'rounded-sm border border-ink-300 bg-white px-2 py-1.5 text-sm text-ink-900 tabular-nums aria-[invalid=true]:border-alert-600';

export function TextField({ name, label, hint, ...props }: Common & InputHTMLAttributes<HTMLInputElement>) {
  const [field, meta] = useField(name);
  const error = meta.touched && meta.error ? meta.error : undefined;
  return (
    <Frame name={name} label={label} hint={hint} error={error}>
      <input
        id={name}
        {...field}
        value={field.value ?? ''}
        aria-invalid={!!error}
        aria-describedby={describedBy(name, error, hint)}
        className={inputClass}
        {...props}
      />
    </Frame>
  );
}

export function SelectField({ name, label, hint, children, ...props }: Common & SelectHTMLAttributes<HTMLSelectElement>) {
  const [field, meta] = useField(name);
  const error = meta.touched && meta.error ? meta.error : undefined;
  return (
    <Frame name={name} label={label} hint={hint} error={error}>
      <select id={name} {...field} value={field.value ?? ''} aria-invalid={!!error} aria-describedby={describedBy(name, error, hint)} className={inputClass} {...props}>
        {children}
      </select>
    </Frame>
  );
}

export function TextAreaField({ name, label, hint, ...props }: Common & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const [field, meta] = useField(name);
  const error = meta.touched && meta.error ? meta.error : undefined;
  return (
    <Frame name={name} label={label} hint={hint} error={error}>
      <textarea id={name} {...field} value={field.value ?? ''} aria-invalid={!!error} aria-describedby={describedBy(name, error, hint)} className={inputClass} rows={3} {...props} />
    </Frame>
  );
}

export function CheckboxField({ name, label, hint }: Common) {
  const [field, meta] = useField({ name, type: 'checkbox' });
  return (
    <div className="flex items-start gap-2">
      <input id={name} type="checkbox" {...field} className="mt-1 h-4 w-4 accent-ink-900" />
      <div>
        <label htmlFor={name} className="text-sm text-ink-900">
          {label}
        </label>
        {hint && <p className="text-xs text-ink-500">{hint}</p>}
        {meta.touched && meta.error && (
          <p role="alert" className="text-xs text-alert-600">
            {meta.error}
          </p>
        )}
      </div>
    </div>
  );
}
