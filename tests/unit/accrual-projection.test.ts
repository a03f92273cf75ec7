/**
 * Projection of the dates n1 and n are reached, on constructed accrual histories with the dates
 * worked out by hand in the comments. Calendar facts (ISO 8601 weeks) are common practice.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { addDays, isoWeekOf } from '../../server/accrual/calendar.js';
import { daysOpen, projectTarget, rangeMonths, rateWindow } from '../../server/accrual/projection.js';
import { cumulativeSeries, plannedBy } from '../../server/accrual/timeline.js';

const TODAY = '2026-12-07';
// Complete months before December 2026: June to November, with these enrolments.
const MONTHS = [
  { month: '2026-06', enrolled: 3, daysOpen: 30 },
  { month: '2026-07', enrolled: 4, daysOpen: 31 },
  { month: '2026-08', enrolled: 2, daysOpen: 31 },
  { month: '2026-09', enrolled: 6, daysOpen: 30 },
  { month: '2026-10', enrolled: 5, daysOpen: 31 },
  { month: '2026-11', enrolled: 7, daysOpen: 30 },
];

describe('projecting when a cohort reaches n1 and n', () => {
  it('when enrolment began long ago, then the window is the last 90 days up to today', () => {
    // 2026-12-07 − 89 days = 2026-09-09; 2026-09-09 … 2026-12-07 inclusive is 90 days.
    expect(rateWindow(TODAY, '2026-03-02')).toEqual({ from: '2026-09-09', to: TODAY, days: 90 });
    expect(rangeMonths(TODAY, '2026-03-02')).toEqual(MONTHS.map((m) => m.month));
  });

  it('when 18 patients came in the last 90 days and 23 are still needed, then the dates are those computed by hand', () => {
    const projection = projectTarget({ today: TODAY, counted: 20, target: 43, window: rateWindow(TODAY, '2026-03-02'), enrolledInWindow: 18, months: MONTHS });
    // Rate 18 / 90 = 0.2 a day; 23 remaining / 0.2 = 115 days.
    // 2026-12-07 + 115: +24 → 12-31, +31 → 01-31 (55), +28 → 02-28 (83), +31 → 03-31 (114), +1 → 2027-04-01.
    expect(projection.expected).toBe('2027-04-01');
    // Fastest month, November, 7 patients: 23 × 30.4375 / 7 = 100.009 days → 101 days.
    // 2026-12-07 + 101: +24 → 12-31, +31 → 01-31 (55), +28 → 02-28 (83), +18 → 2027-03-18.
    expect(projection.earliest).toBe('2027-03-18');
    // Slowest month, August, 2 patients: 23 × 30.4375 / 2 = 350.03 days → 351 days; 365 days is 2027-12-07, less 14 → 2027-11-23.
    expect(projection.latest).toBe('2027-11-23');
    // 0.2 a day × 30.4375 days a month = 6.0875 a month.
    expect(projection.ratePerMonth).toBeCloseTo(6.0875, 10);
    expect(projection).toMatchObject({
      reached: false,
      remaining: 23,
      slowestMonth: { month: '2026-08', enrolled: 2 },
      fastestMonth: { month: '2026-11', enrolled: 7 },
    });
    expect(projection.note).toMatch(/18 patients in the last 90 days/);
  });

  it('when enrolment began 30 days ago, then the window starts at the first enrolment and its partial month counts for the days it was open', () => {
    // First enrolment 2026-11-08: 2026-11-08 … 2026-12-07 inclusive is 30 days.
    const window = rateWindow(TODAY, '2026-11-08');
    expect(window).toEqual({ from: '2026-11-08', to: TODAY, days: 30 });
    expect(rangeMonths(TODAY, '2026-11-08')).toEqual(['2026-11']);
    // November was open from the 8th: 23 of its 30 days.
    expect(daysOpen('2026-11', '2026-11-08')).toBe(23);
    expect(daysOpen('2026-10', '2026-03-02')).toBe(31);
    // 6 in 30 days = 0.2 a day; 10 remaining → 50 days: +24 → 12-31, +26 → 2027-01-26.
    // November's 6 in 23 days is 6 × 30 / 23 = 7.826 a month (not 6): 10 × 30.4375 / 7.826 = 38.89 → 39 days: +24 → 12-31, +15 → 2027-01-15.
    // Read as a full month, its 6 would have put both ends at 2027-01-27, after the expected date.
    const projection = projectTarget({ today: TODAY, counted: 3, target: 13, window, enrolledInWindow: 6, months: [{ month: '2026-11', enrolled: 6, daysOpen: 23 }] });
    expect(projection.fastestMonth?.perMonth).toBeCloseTo((6 * 30) / 23, 10);
    // The one month is faster than the window, so the range runs from it to the expected date.
    expect(projection).toMatchObject({ expected: '2027-01-26', earliest: '2027-01-15', latest: '2027-01-26' });
    expect(projection.note).toMatch(/2026-11 counts for the 23 days enrolment was open: 6 enrolled, about 7\.8 a month/);
    expect(projection.note).toMatch(/widened to the recent rate/);
  });

  it('when the recent window is faster than every month, then the earliest date is the expected one, not later', () => {
    // Window: 45 in 90 days = 0.5 a day; 23 remaining → 46 days → 2027-01-22. The fastest month (7) gives 101 days → 2027-03-18.
    const projection = projectTarget({ today: TODAY, counted: 20, target: 43, window: rateWindow(TODAY, '2026-03-02'), enrolledInWindow: 45, months: MONTHS });
    expect(projection.expected).toBe('2027-01-22');
    expect(projection.earliest).toBe('2027-01-22');
    expect(projection.latest).toBe('2027-11-23');
  });

  it('when any accrual history is projected, then "Expected" always lies inside its range', () => {
    const month = fc.record({ enrolled: fc.integer({ min: 0, max: 40 }), daysOpen: fc.integer({ min: 1, max: 30 }) });
    fc.assert(
      fc.property(fc.array(month, { minLength: 1, maxLength: 6 }), fc.integer({ min: 0, max: 120 }), fc.integer({ min: 1, max: 200 }), (history, inWindow, remaining) => {
        const months = history.map((m, i) => ({ month: `2026-${String(i + 6).padStart(2, '0')}`, enrolled: m.enrolled, daysOpen: i === 0 ? m.daysOpen : i + 6 === 6 || i + 6 === 9 || i + 6 === 11 ? 30 : 31 }));
        const p = projectTarget({ today: TODAY, counted: 0, target: remaining, window: rateWindow(TODAY, '2026-03-02'), enrolledInWindow: inWindow, months });
        if (p.expected && p.earliest) expect(p.earliest <= p.expected).toBe(true);
        if (p.expected && p.latest) expect(p.expected <= p.latest).toBe(true);
      }),
      { numRuns: 500 },
    );
  });

  it('when nobody was enrolled in the window or in a recent month, then there is no date rather than a distant one', () => {
    const quiet = projectTarget({ today: TODAY, counted: 20, target: 43, window: rateWindow(TODAY, '2026-03-02'), enrolledInWindow: 0, months: [...MONTHS.slice(0, 5), { month: '2026-11', enrolled: 0, daysOpen: 30 }] });
    expect(quiet.expected).toBeNull();
    expect(quiet.latest).toBeNull();
    // The fastest month (September, 6) still bounds the earliest date: 23 × 30.4375 / 6 = 116.68 → 117 days.
    expect(quiet.earliest).toBe(addDays(TODAY, 117));
    expect(quiet.note).toMatch(/Cannot project: nobody was enrolled in the last 90 days/);
    const none = projectTarget({ today: TODAY, counted: 0, target: 13, window: rateWindow(TODAY, null), enrolledInWindow: 0, months: [] });
    expect(none).toMatchObject({ expected: null, earliest: null, latest: null });
    expect(none.note).toMatch(/nobody has been enrolled yet/);
  });

  it('when the target is already reached, then it says so and gives no date', () => {
    expect(projectTarget({ today: TODAY, counted: 13, target: 13, window: rateWindow(TODAY, '2026-03-02'), enrolledInWindow: 5, months: MONTHS })).toMatchObject({
      reached: true,
      remaining: 0,
      expected: null,
    });
  });
});

describe('cumulative enrolment against the plan', () => {
  it('when 4 patients a month are planned from 2026-01-01, then the plan at 2026-01-31 is 31 days × 4 / 30.4375 = 4.07 → 4.1', () => {
    expect(plannedBy({ perMonth: 4, startDate: '2026-01-01' }, '2026-01-31')).toBe(4.1);
    expect(plannedBy({ perMonth: 4, startDate: '2026-01-01' }, '2025-12-31')).toBe(0);
    expect(plannedBy(null, '2026-01-31')).toBeNull();
  });

  it('when months are counted, then the series runs from the first month to today with a running total', () => {
    const series = cumulativeSeries({ granularity: 'month', from: '2026-10-15', today: TODAY, counts: new Map([['2026-10', 2], ['2026-12', 3]]), plan: null });
    expect(series.map((p) => [p.period, p.enrolled, p.cumulative])).toEqual([
      ['2026-10', 2, 2],
      ['2026-11', 0, 2],
      ['2026-12', 3, 5],
    ]);
  });

  it('when weeks are labelled, then they follow ISO 8601 (the week belongs to the year of its Thursday; common practice)', () => {
    // 2026-01-01 is a Thursday, so the week of 2025-12-29 is 2026-W01, and 2026 has 53 weeks.
    expect(isoWeekOf('2025-12-29')).toBe('2026-W01');
    expect(isoWeekOf('2027-01-01')).toBe('2026-W53');
    expect(isoWeekOf(TODAY)).toBe('2026-W50');
    expect(isoWeekOf('2027-01-04')).toBe('2027-W01');
  });
});
