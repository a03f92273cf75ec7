/**
 * The evaluation's counting in SQL: patients grouped by what the counting rules look at, the
 * responders path for the chart, and how many patients count under a population. These mirror the
 * one definition in counting.ts (which the tests compare them against) without loading every
 * patient into Node.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { AnalysisPopulation, Outcome } from './counting.js';

type Conn = Db | Knex.Transaction;

/** How a cohort is counted: its population and n1 (null for one stage or without a locked design). */
export type CountingRule = { cohortId: string; population: AnalysisPopulation; n1: number | null };

/**
 * Patients grouped by what the counting rules look at: whether they count, their effective outcome,
 * evaluability and stage (first n1 counting patients in enrolment order). A few rows per cohort
 * instead of every patient.
 */
export type CountingGroup = {
  cohortId: string;
  stage: 1 | 2;
  counts: boolean;
  outcome: Outcome;
  evaluable: boolean;
  patients: number;
};

/** A point of the responders path: the k-th decided counting patient and the responders so far. */
export type PathPoint = { cohortId: string; evaluable: number; responders: number };

const RULES_SQL = 'select * from unnest(?::uuid[], ?::boolean[], ?::int[]) as r(cohort_id, evaluable_only, n1)';
// The pg driver sends JS arrays (nulls included) as PostgreSQL arrays.
const rulesBindings = (rules: CountingRule[]) =>
  [rules.map((r) => r.cohortId), rules.map((r) => r.population === 'evaluable'), rules.map((r) => r.n1)] as Knex.RawBinding[];

// The effective outcome: under "all enrolled" a patient who is not evaluable counts as a non-responder.
const COUNTED_PATIENTS = `select p.cohort_id, p.site_id, p.enrolment_seq, p.evaluable, r.n1,
    (not r.evaluable_only or p.evaluable) as counts,
    case when not r.evaluable_only and not p.evaluable then 'non_responder' else p.outcome end as outcome
  from patients p join rules r on r.cohort_id = p.cohort_id`;

export async function countingGroups(db: Conn, rules: CountingRule[]): Promise<CountingGroup[]> {
  if (rules.length === 0) return [];
  const { rows } = await db.raw(
    `with rules as (${RULES_SQL}),
     counted as (${COUNTED_PATIENTS}),
     ranked as (
       select *, count(*) filter (where counts) over (partition by cohort_id order by enrolment_seq rows between unbounded preceding and 1 preceding) as before
       from counted
     )
     select cohort_id, (n1 is null or before < n1) as stage1, counts, outcome, evaluable, count(*)::int as patients
     from ranked group by 1, 2, 3, 4, 5`,
    rulesBindings(rules),
  );
  return (rows as Array<{ cohort_id: string; stage1: boolean; counts: boolean; outcome: Outcome; evaluable: boolean; patients: number }>).map((r) => ({
    cohortId: r.cohort_id,
    stage: r.stage1 ? 1 : 2,
    counts: r.counts,
    outcome: r.outcome,
    evaluable: r.evaluable,
    patients: r.patients,
  }));
}

/**
 * The responders path of each cohort (decided counting patients in enrolment order), thinned to
 * about `maxPoints` evenly spaced points; the first and the last point are always exact.
 */
export async function responderPaths(db: Conn, rules: CountingRule[], maxPoints: number): Promise<PathPoint[]> {
  if (rules.length === 0) return [];
  const { rows } = await db.raw(
    `with rules as (${RULES_SQL}),
     counted as (${COUNTED_PATIENTS}),
     decided as (
       select cohort_id, row_number() over w as k, count(*) filter (where outcome = 'responder') over w as responders, count(*) over (partition by cohort_id) as total
       from counted where counts and outcome <> 'pending'
       window w as (partition by cohort_id order by enrolment_seq rows between unbounded preceding and current row)
     )
     select cohort_id, k::int as evaluable, responders::int as responders from decided
     where k = 1 or k = total or k % ceil(total / ?::numeric)::int = 0
     order by cohort_id, k`,
    [...rulesBindings(rules), maxPoints],
  );
  return (rows as Array<{ cohort_id: string; evaluable: number; responders: number }>).map((r) => ({ cohortId: r.cohort_id, evaluable: r.evaluable, responders: r.responders }));
}

/** One site's live counts in one cohort, under the cohort's population. */
export type SiteCounts = { cohortId: string; siteId: string; siteCode: string; enrolled: number; counted: number; decided: number; responders: number; pending: number };

/** Live counts by cohort and site, for the given sites only (none asked, no query). */
export async function siteCounts(db: Conn, rules: CountingRule[], siteIds: readonly string[]): Promise<SiteCounts[]> {
  if (rules.length === 0 || siteIds.length === 0) return [];
  const { rows } = await db.raw(
    `with rules as (${RULES_SQL}),
     counted as (${COUNTED_PATIENTS} where p.site_id = any(?::uuid[]))
     select c.cohort_id, c.site_id, s.code as site_code,
            count(*)::int as enrolled,
            count(*) filter (where c.counts)::int as counted,
            count(*) filter (where c.counts and c.outcome <> 'pending')::int as decided,
            count(*) filter (where c.counts and c.outcome = 'responder')::int as responders,
            count(*) filter (where c.counts and c.outcome = 'pending')::int as pending
       from counted c join sites s on s.id = c.site_id
      group by 1, 2, 3
      order by s.code`,
    [...rulesBindings(rules), [...siteIds]],
  );
  return (rows as Array<{ cohort_id: string; site_id: string; site_code: string; enrolled: number; counted: number; decided: number; responders: number; pending: number }>).map((r) => ({
    cohortId: r.cohort_id,
    siteId: r.site_id,
    siteCode: r.site_code,
    enrolled: r.enrolled,
    counted: r.counted,
    decided: r.decided,
    responders: r.responders,
    pending: r.pending,
  }));
}

/** Patients of the cohort that count under the population (every one, or the evaluable ones). */
export async function countCounting(db: Conn, cohortId: string, population: AnalysisPopulation): Promise<number> {
  const query = db('patients').where({ cohort_id: cohortId });
  if (population === 'evaluable') query.where({ evaluable: true });
  const [{ count }] = await query.count({ count: '*' });
  return Number(count);
}
