/**
 * When will a cohort reach n1 and n? Pure arithmetic on aggregate counts, so it can be checked
 * by hand. The expected date comes from the accrual rate over a stated recent window (the last
 * 90 days, or fewer when enrolment began more recently); the range comes from the slowest and the
 * fastest of the last calendar months before this one (up to six), which shows how uncertain the
 * central date is. The month of the first enrolment was open only from that day: its enrolments
 * are scaled to a whole month (enrolled × days in the month ÷ days open) rather than read as a
 * full month's. The range always holds the expected date: where the window's rate is faster or
 * slower than every month's, it widens to it. A rate of zero gives no date: "cannot project",
 * never a date far in the future.
 */
import { plural } from '../words/index.js';
import { DAYS_PER_MONTH, addDays, addMonths, daysBetween, firstOfMonth, lastOfMonth, monthOf } from './calendar.js';

export const RATE_WINDOW_DAYS = 90;
export const RANGE_MONTHS = 6;

export type RateWindow = { from: string; to: string; days: number };

/** The window the rate is measured over: the last 90 days up to today, never before the first enrolment. */
export function rateWindow(today: string, firstEnrolledOn: string | null): RateWindow | null {
  if (!firstEnrolledOn || firstEnrolledOn > today) return null;
  const earliest = addDays(today, -(RATE_WINDOW_DAYS - 1));
  const from = firstEnrolledOn > earliest ? firstEnrolledOn : earliest;
  return { from, to: today, days: daysBetween(from, today) + 1 };
}

/** The last complete calendar months before today's month ('YYYY-MM', oldest first), not before the first enrolment's month. */
export function rangeMonths(today: string, firstEnrolledOn: string | null, count = RANGE_MONTHS): string[] {
  if (!firstEnrolledOn) return [];
  const current = monthOf(today);
  const first = monthOf(firstEnrolledOn);
  const months: string[] = [];
  for (let back = count; back >= 1; back -= 1) {
    const month = addMonths(current, -back);
    if (month >= first) months.push(month);
  }
  return months;
}

/** The days of `month` that enrolment was open: all of them, or from the first enrolment in its month. */
export function daysOpen(month: string, firstEnrolledOn: string): number {
  const from = firstEnrolledOn > firstOfMonth(month) ? firstEnrolledOn : firstOfMonth(month);
  return Math.max(0, daysBetween(from, lastOfMonth(month)) + 1);
}

/** A recent month's enrolments as a monthly rate, with the days it was open. */
export type MonthRate = { month: string; enrolled: number; daysOpen: number; perMonth: number };

export type ProjectionInput = {
  today: string;
  /** Patients counting toward the design so far (under the protocol's analysis population). */
  counted: number;
  target: number;
  window: RateWindow | null;
  /** Counting enrolments inside the window. */
  enrolledInWindow: number;
  /** Counting enrolments in each of the range months (a month without enrolments is 0), and the days it was open. */
  months: Array<{ month: string; enrolled: number; daysOpen: number }>;
};

export type Projection = {
  size: number;
  counted: number;
  remaining: number;
  reached: boolean;
  /** Central date from the window's rate; null when it cannot be projected. */
  expected: string | null;
  /** From the fastest recent month, or the window's rate when faster. */
  earliest: string | null;
  /** From the slowest recent month, or the window's rate when slower; null when that month had no enrolments. */
  latest: string | null;
  /** Counting patients per month over the window. */
  ratePerMonth: number | null;
  slowestMonth: MonthRate | null;
  fastestMonth: MonthRate | null;
  /** Plain words: what the dates rest on, or why there is none. */
  note: string;
};


/** Days needed to enrol `remaining` patients at `perDay`, rounded up to a whole day. */
const daysToGo = (remaining: number, perDay: number) => Math.ceil(remaining / perDay - 1e-9);

/** A month's enrolments as a monthly rate: a month open only in part counts for the share it was open. */
function monthRate(m: ProjectionInput['months'][number]): MonthRate {
  const length = daysBetween(firstOfMonth(m.month), lastOfMonth(m.month)) + 1;
  return { ...m, perMonth: m.daysOpen > 0 ? (m.enrolled * length) / m.daysOpen : 0 };
}

const earlier = (a: string, b: string) => (a < b ? a : b);
const later = (a: string, b: string) => (a > b ? a : b);

export function projectTarget(input: ProjectionInput): Projection {
  const remaining = Math.max(0, input.target - input.counted);
  const base = { size: input.target, counted: input.counted, remaining };
  const months = input.months.map(monthRate);
  const pick = (better: (a: MonthRate, b: MonthRate) => boolean) => months.reduce<MonthRate | null>((best, m) => (!best || better(m, best) ? m : best), null);
  const slowestMonth = pick((a, b) => a.perMonth < b.perMonth);
  const fastestMonth = pick((a, b) => a.perMonth > b.perMonth);
  if (remaining === 0) {
    return { ...base, reached: true, expected: null, earliest: null, latest: null, ratePerMonth: null, slowestMonth, fastestMonth, note: 'Reached.' };
  }
  const window = input.window;
  const perDay = window && window.days > 0 ? input.enrolledInWindow / window.days : 0;
  const ratePerMonth = window ? perDay * DAYS_PER_MONTH : null;
  const at = (monthly: number) => (monthly > 0 ? addDays(input.today, daysToGo(remaining, monthly / DAYS_PER_MONTH)) : null);
  const expected = perDay > 0 ? addDays(input.today, daysToGo(remaining, perDay)) : null;
  const fromMonths = { earliest: fastestMonth ? at(fastestMonth.perMonth) : null, latest: slowestMonth ? at(slowestMonth.perMonth) : null };
  // The range holds the expected date: the window's rate widens it where no month was as fast or as slow.
  const earliest = fromMonths.earliest && expected ? earlier(fromMonths.earliest, expected) : fromMonths.earliest;
  const latest = fromMonths.latest && expected ? later(fromMonths.latest, expected) : fromMonths.latest;
  const notes: string[] = [];
  if (!window) notes.push('Cannot project: nobody has been enrolled yet.');
  else if (perDay === 0) notes.push(`Cannot project: nobody was enrolled in the last ${plural(window.days, 'day')}.`);
  else notes.push(`${plural(input.enrolledInWindow, 'patient')} in the last ${plural(window.days, 'day')} (${window.from} to ${window.to}).`);
  if (months.length === 0) notes.push('No calendar month of enrolment before this one yet, so no range.');
  else if (slowestMonth && slowestMonth.enrolled === 0) {
    notes.push(`Range from the last ${plural(months.length, 'month')}: the slowest had no enrolments, so there is no latest date.`);
  } else if (months.length === 1) notes.push(`Range from the one month so far (${months[0].month}).`);
  else notes.push(`Range from the slowest and fastest of the last ${months.length} months.`);
  const partial = months.find((m) => m.daysOpen < daysBetween(firstOfMonth(m.month), lastOfMonth(m.month)) + 1);
  if (partial) {
    notes.push(`${partial.month} counts for the ${plural(partial.daysOpen, 'day')} enrolment was open: ${partial.enrolled} enrolled, about ${partial.perMonth.toFixed(1)} a month.`);
  }
  if (earliest !== fromMonths.earliest || latest !== fromMonths.latest) notes.push('The range is widened to the recent rate, which no single month matched.');
  return { ...base, reached: false, expected, earliest, latest, ratePerMonth, slowestMonth, fastestMonth, note: notes.join(' ') };
}
