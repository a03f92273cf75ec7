/**
 * Cumulative enrolment over time against the plan, built from per-period counts (months or ISO
 * weeks). The plan is linear from the trial's start date at the planned patients per month.
 */
import { DAYS_PER_MONTH, addDays, addMonths, daysBetween, firstOfMonth, isoWeekOf, lastOfMonth, mondayOf, monthOf } from './calendar.js';

export type Granularity = 'month' | 'week';
export type Plan = { perMonth: number; startDate: string };

export type SeriesPoint = {
  /** 'YYYY-MM' or an ISO week 'YYYY-Www'. */
  period: string;
  start: string;
  end: string;
  enrolled: number;
  cumulative: number;
  /** Planned cumulative enrolment at the period's end (or today, for the current period); null without a plan. */
  planned: number | null;
};

/** Planned cumulative enrolment on `day` (inclusive), one decimal. */
export function plannedBy(plan: Plan | null, day: string): number | null {
  if (!plan) return null;
  const days = Math.max(0, daysBetween(plan.startDate, day) + 1);
  return Math.round(((plan.perMonth * days) / DAYS_PER_MONTH) * 10) / 10;
}

function periods(granularity: Granularity, from: string, today: string): Array<{ period: string; start: string; end: string }> {
  const out: Array<{ period: string; start: string; end: string }> = [];
  if (granularity === 'month') {
    for (let month = monthOf(from); month <= monthOf(today); month = addMonths(month, 1)) {
      out.push({ period: month, start: firstOfMonth(month), end: lastOfMonth(month) });
    }
  } else {
    for (let monday = mondayOf(from); monday <= today; monday = addDays(monday, 7)) {
      out.push({ period: isoWeekOf(monday), start: monday, end: addDays(monday, 6) });
    }
  }
  return out;
}

export function cumulativeSeries(input: {
  granularity: Granularity;
  from: string | null;
  today: string;
  counts: Map<string, number>;
  plan: Plan | null;
}): SeriesPoint[] {
  if (!input.from || input.from > input.today) return [];
  let cumulative = 0;
  return periods(input.granularity, input.from, input.today).map(({ period, start, end }) => {
    const enrolled = input.counts.get(period) ?? 0;
    cumulative += enrolled;
    return { period, start, end, enrolled, cumulative, planned: plannedBy(input.plan, end < input.today ? end : input.today) };
  });
}
