/**
 * Calendar arithmetic on 'YYYY-MM-DD' days in UTC, so that a server's time zone never moves a
 * date, plus the ISO week label ('2026-W49') used by the weekly buckets and the weekly digest.
 */
const MS_PER_DAY = 86_400_000;

/** Average length of a calendar month in days (365.25 / 12): turns monthly rates into daily ones. */
export const DAYS_PER_MONTH = 365.25 / 12;

export const toDay = (date: Date): string => date.toISOString().slice(0, 10);

const parse = (day: string): number => Date.UTC(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 1, Number(day.slice(8, 10)));

export const addDays = (day: string, days: number): string => toDay(new Date(parse(day) + days * MS_PER_DAY));

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export const daysBetween = (from: string, to: string): number => Math.round((parse(to) - parse(from)) / MS_PER_DAY);

export const monthOf = (day: string): string => day.slice(0, 7);

export const firstOfMonth = (month: string): string => `${month}-01`;

export function addMonths(month: string, months: number): string {
  const index = Number(month.slice(0, 4)) * 12 + Number(month.slice(5, 7)) - 1 + months;
  return `${Math.floor(index / 12)}-${String((index % 12) + 1).padStart(2, '0')}`;
}

export const lastOfMonth = (month: string): string => addDays(firstOfMonth(addMonths(month, 1)), -1);

/** The Monday that starts the ISO week holding `day`. */
export function mondayOf(day: string): string {
  const weekday = new Date(parse(day)).getUTCDay();
  return addDays(day, -((weekday + 6) % 7));
}

/** ISO 8601 week label: the week belongs to the year of its Thursday. */
export function isoWeekOf(day: string): string {
  const thursday = addDays(mondayOf(day), 3);
  const year = thursday.slice(0, 4);
  const week = Math.floor(daysBetween(`${year}-01-01`, thursday) / 7) + 1;
  return `${year}-W${String(week).padStart(2, '0')}`;
}
