/**
 * Enrolment counts for the Accrual page, the Portfolio and the weekly digest. Every query
 * aggregates in PostgreSQL (GROUP BY, count … filter): no patient row ever reaches Node.
 */
import type { Db } from '../db/knex.js';
import { RATE_WINDOW_DAYS, RANGE_MONTHS } from './projection.js';
import { addDays, addMonths, firstOfMonth, monthOf } from './calendar.js';

/** A cohort's patients counted every way the rules need; "pending" and "responders" count evaluable patients only. */
export type CohortTally = {
  cohortId: string;
  enrolled: number;
  evaluable: number;
  pending: number;
  responders: number;
  stage1Enrolled: number;
  stage1Evaluable: number;
  stage1Pending: number;
  stage1Responders: number;
  firstEnrolledOn: string | null;
  lastEnrolledOn: string | null;
  /** Enrolments in the rate window ending today (all, and evaluable only). */
  windowEnrolled: number;
  windowEvaluable: number;
  /** Enrolments in the seven days up to today. */
  lastWeekEnrolled: number;
};

export type MonthCount = { cohortId: string; month: string; enrolled: number; evaluable: number };

export const emptyTally = (cohortId: string): CohortTally => ({
  cohortId,
  enrolled: 0,
  evaluable: 0,
  pending: 0,
  responders: 0,
  stage1Enrolled: 0,
  stage1Evaluable: 0,
  stage1Pending: 0,
  stage1Responders: 0,
  firstEnrolledOn: null,
  lastEnrolledOn: null,
  windowEnrolled: 0,
  windowEvaluable: 0,
  lastWeekEnrolled: 0,
});

export async function cohortTallies(db: Db, cohortIds: string[], today: string): Promise<Map<string, CohortTally>> {
  if (cohortIds.length === 0) return new Map();
  const windowFrom = addDays(today, -(RATE_WINDOW_DAYS - 1));
  const weekFrom = addDays(today, -6);
  const rows = await db('patients')
    .whereIn('cohort_id', cohortIds)
    .groupBy('cohort_id')
    .select(
      'cohort_id',
      db.raw('count(*)::int as enrolled'),
      db.raw('count(*) filter (where evaluable)::int as evaluable'),
      db.raw(`count(*) filter (where evaluable and outcome = 'pending')::int as pending`),
      db.raw(`count(*) filter (where evaluable and outcome = 'responder')::int as responders`),
      db.raw('count(*) filter (where stage = 1)::int as stage1_enrolled'),
      db.raw('count(*) filter (where stage = 1 and evaluable)::int as stage1_evaluable'),
      db.raw(`count(*) filter (where stage = 1 and evaluable and outcome = 'pending')::int as stage1_pending`),
      db.raw(`count(*) filter (where stage = 1 and evaluable and outcome = 'responder')::int as stage1_responders`),
      db.raw('min(enrolled_on) as first_enrolled_on'),
      db.raw('max(enrolled_on) as last_enrolled_on'),
      db.raw('count(*) filter (where enrolled_on between ? and ?)::int as window_enrolled', [windowFrom, today]),
      db.raw('count(*) filter (where evaluable and enrolled_on between ? and ?)::int as window_evaluable', [windowFrom, today]),
      db.raw('count(*) filter (where enrolled_on between ? and ?)::int as last_week_enrolled', [weekFrom, today]),
    );
  return new Map(
    rows.map((row: Record<string, unknown>) => [
      row.cohort_id as string,
      {
        cohortId: row.cohort_id as string,
        enrolled: row.enrolled as number,
        evaluable: row.evaluable as number,
        pending: row.pending as number,
        responders: row.responders as number,
        stage1Enrolled: row.stage1_enrolled as number,
        stage1Evaluable: row.stage1_evaluable as number,
        stage1Pending: row.stage1_pending as number,
        stage1Responders: row.stage1_responders as number,
        firstEnrolledOn: row.first_enrolled_on as string | null,
        lastEnrolledOn: row.last_enrolled_on as string | null,
        windowEnrolled: row.window_enrolled as number,
        windowEvaluable: row.window_evaluable as number,
        lastWeekEnrolled: row.last_week_enrolled as number,
      },
    ]),
  );
}

/** Enrolments per cohort and calendar month over the months the projection range looks at. */
export async function recentMonthCounts(db: Db, cohortIds: string[], today: string): Promise<MonthCount[]> {
  if (cohortIds.length === 0) return [];
  const from = firstOfMonth(addMonths(monthOf(today), -RANGE_MONTHS));
  const rows = await db('patients')
    .whereIn('cohort_id', cohortIds)
    .where('enrolled_on', '>=', from)
    .where('enrolled_on', '<=', today)
    .groupByRaw('cohort_id, 2')
    .select(
      'cohort_id',
      db.raw(`to_char(enrolled_on, 'YYYY-MM') as month`),
      db.raw('count(*)::int as enrolled'),
      db.raw('count(*) filter (where evaluable)::int as evaluable'),
    );
  return rows.map((row: Record<string, unknown>) => ({
    cohortId: row.cohort_id as string,
    month: row.month as string,
    enrolled: row.enrolled as number,
    evaluable: row.evaluable as number,
  }));
}

export type SiteTally = {
  siteId: string;
  code: string;
  name: string;
  /** Null when the site enrolled patients but is no longer listed on the trial. */
  plannedPerMonth: number | null;
  listed: boolean;
  /** When the site joined the trial (its membership row), for a site that never enrolled. */
  joinedOn: string | null;
  enrolled: number;
  evaluable: number;
  pending: number;
  lastEnrolledOn: string | null;
};

/** Every site of the trial (listed or with patients) with its enrolment counts. */
export async function siteTallies(db: Db, trialId: string, today: string): Promise<SiteTally[]> {
  const { rows } = await db.raw(
    `with counts as (
       select site_id,
              count(*)::int as enrolled,
              count(*) filter (where evaluable)::int as evaluable,
              count(*) filter (where evaluable and outcome = 'pending')::int as pending,
              max(enrolled_on) as last_enrolled_on
         from patients
        where trial_id = ? and enrolled_on <= ?
        group by site_id)
     select s.id as site_id, s.code, s.name, ts.planned_accrual_per_month, ts.site_id is not null as listed,
            to_char(ts.created_at at time zone 'UTC', 'YYYY-MM-DD') as joined_on,
            coalesce(c.enrolled, 0) as enrolled, coalesce(c.evaluable, 0) as evaluable,
            coalesce(c.pending, 0) as pending, c.last_enrolled_on
       from sites s
       left join trial_sites ts on ts.site_id = s.id and ts.trial_id = ?
       left join counts c on c.site_id = s.id
      where ts.site_id is not null or c.site_id is not null
      order by s.code`,
    [trialId, today, trialId],
  );
  return rows.map((row: Record<string, unknown>) => ({
    siteId: row.site_id as string,
    code: row.code as string,
    name: row.name as string,
    plannedPerMonth: row.planned_accrual_per_month as number | null,
    listed: row.listed as boolean,
    joinedOn: row.joined_on as string | null,
    enrolled: row.enrolled as number,
    evaluable: row.evaluable as number,
    pending: row.pending as number,
    lastEnrolledOn: row.last_enrolled_on as string | null,
  }));
}

export type PeriodCount = { siteId: string; period: string; enrolled: number };

/** Enrolments per site and calendar month ('YYYY-MM'). */
export async function monthlyBySite(db: Db, trialId: string, today: string): Promise<PeriodCount[]> {
  const rows = await db('patients')
    .where({ trial_id: trialId })
    .where('enrolled_on', '<=', today)
    .groupByRaw('site_id, 2')
    .select('site_id', db.raw(`to_char(enrolled_on, 'YYYY-MM') as period`), db.raw('count(*)::int as enrolled'));
  return rows.map((row: Record<string, unknown>) => ({ siteId: row.site_id as string, period: row.period as string, enrolled: row.enrolled as number }));
}

/** Enrolments per ISO week ('YYYY-Www', the year of the week's Thursday), all sites together. */
export async function weeklyCounts(db: Db, trialId: string, today: string): Promise<Map<string, number>> {
  const rows = await db('patients')
    .where({ trial_id: trialId })
    .where('enrolled_on', '<=', today)
    .groupByRaw('1')
    .select(db.raw(`to_char(enrolled_on, 'IYYY-"W"IW') as period`), db.raw('count(*)::int as enrolled'));
  return new Map(rows.map((row: Record<string, unknown>) => [row.period as string, row.enrolled as number]));
}
