/**
 * When will a cohort reach n1 and n? Pure arithmetic on aggregate counts, so it can be checked
 * by hand. The expected date comes from the accrual rate over a stated recent window (the last
 * 90 days, or fewer when enrolment began more recently); the range comes from the slowest and the
 * fastest of the last complete calendar months (up to six), which shows how uncertain the central
 * date is. A rate of zero gives no date: "cannot project", never a date far in the future.
 */
import { plural } from '../words/index.js';
import { DAYS_PER_MONTH, addDays, addMonths, daysBetween, monthOf } from './calendar.js';

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

export type ProjectionInput = {
  today: string;
  /** Patients counting toward the design so far (under the protocol's analysis population). */
  counted: number;
  target: number;
  window: RateWindow | null;
  /** Counting enrolments inside the window. */
  enrolledInWindow: number;
  /** Counting enrolments in each of the range months (a month without enrolments is 0). */
  months: Array<{ month: string; enrolled: number }>;
};

export type Projection = {
  size: number;
  counted: number;
  remaining: number;
  reached: boolean;
  /** Central date from the window's rate; null when it cannot be projected. */
  expected: string | null;
  /** From the fastest recent month. */
  earliest: string | null;
  /** From the slowest recent month; null when that month had no enrolments. */
  latest: string | null;
  /** Counting patients per month over the window. */
  ratePerMonth: number | null;
  slowestMonth: { month: string; enrolled: number } | null;
  fastestMonth: { month: string; enrolled: number } | null;
  /** Plain words: what the dates rest on, or why there is none. */
  note: string;
};


/** Days needed to enrol `remaining` patients at `perDay`, rounded up to a whole day. */
const daysToGo = (remaining: number, perDay: number) => Math.ceil(remaining / perDay - 1e-9);

export function projectTarget(input: ProjectionInput): Projection {
  const remaining = Math.max(0, input.target - input.counted);
  const base = { size: input.target, counted: input.counted, remaining };
  type Month = ProjectionInput['months'][number];
  const pick = (better: (a: Month, b: Month) => boolean) => input.months.reduce<Month | null>((best, m) => (!best || better(m, best) ? m : best), null);
  const slowestMonth = pick((a, b) => a.enrolled < b.enrolled);
  const fastestMonth = pick((a, b) => a.enrolled > b.enrolled);
  if (remaining === 0) {
    return { ...base, reached: true, expected: null, earliest: null, latest: null, ratePerMonth: null, slowestMonth, fastestMonth, note: 'Reached.' };
  }
  const window = input.window;
  const perDay = window && window.days > 0 ? input.enrolledInWindow / window.days : 0;
  const ratePerMonth = window ? perDay * DAYS_PER_MONTH : null;
  const at = (monthly: number) => (monthly > 0 ? addDays(input.today, daysToGo(remaining, monthly / DAYS_PER_MONTH)) : null);
  const expected = perDay > 0 ? addDays(input.today, daysToGo(remaining, perDay)) : null;
  const earliest = fastestMonth ? at(fastestMonth.enrolled) : null;
  const latest = slowestMonth ? at(slowestMonth.enrolled) : null;
  const notes: string[] = [];
  if (!window) notes.push('Cannot project: nobody has been enrolled yet.');
  else if (perDay === 0) notes.push(`Cannot project: nobody was enrolled in the last ${plural(window.days, 'day')}.`);
  else notes.push(`${plural(input.enrolledInWindow, 'patient')} in the last ${plural(window.days, 'day')} (${window.from} to ${window.to}).`);
  if (input.months.length === 0) notes.push('No complete calendar month of enrolment yet, so no range.');
  else if (slowestMonth && slowestMonth.enrolled === 0) {
    notes.push(`Range from the last ${plural(input.months.length, 'complete month')}: the slowest had no enrolments, so there is no latest date.`);
  } else if (input.months.length === 1) notes.push(`Range from the one complete month so far (${input.months[0].month}).`);
  else notes.push(`Range from the slowest and fastest of the last ${input.months.length} complete months.`);
  return { ...base, reached: false, expected, earliest, latest, ratePerMonth, slowestMonth, fastestMonth, note: notes.join(' ') };
}
