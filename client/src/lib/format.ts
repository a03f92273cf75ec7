/** Number and date formatting in the user's locale, with tabular figures set in CSS. */
import { format, formatDistanceToNowStrict, isValid, parseISO } from 'date-fns';

export const percent = (value: number | null | undefined, digits = 1) =>
  value === null || value === undefined || Number.isNaN(value) ? '—' : `${(value * 100).toFixed(digits)}%`;

export const decimal = (value: number | null | undefined, digits = 3) =>
  value === null || value === undefined || Number.isNaN(value) ? '—' : value.toFixed(digits);

export const pValue = (value: number | null | undefined) => {
  if (value === null || value === undefined || Number.isNaN(value)) return '—';
  if (value < 0.0001) return '< 0.0001';
  return value.toFixed(4);
};

/** A calendar date stored as 'YYYY-MM-DD', shown in the user's locale. */
export const day = (iso: string | null | undefined) =>
  iso ? new Intl.DateTimeFormat(undefined, { dateStyle: 'medium' }).format(parseISO(iso.slice(0, 10))) : '—';

/** A date as a person typed it in a file: formatted when it is a real calendar date, otherwise shown as written. */
export const dayAsWritten = (value: string) => (/^\d{4}-\d{2}-\d{2}$/.test(value) && isValid(parseISO(value)) ? day(value) : value);

export const dateTime = (iso: string | null | undefined) =>
  iso ? new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' }).format(new Date(iso)) : '—';

export const ago = (iso: string | null | undefined) => (iso ? formatDistanceToNowStrict(new Date(iso), { addSuffix: true }) : '—');

export const isoDay = (date: Date) => format(date, 'yyyy-MM-dd');
