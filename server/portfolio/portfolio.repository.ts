/**
 * What the committee has done with each cohort's data cuts: the latest recommendation and a cut
 * still waiting for review (what was released lives with the evaluation's released figures). A cut
 * without a cohort covers every cohort of its trial. One aggregate query for all cohorts at once.
 */
import type { Db } from '../db/knex.js';

export type CommitteeState = {
  cohortId: string;
  /** Date of the latest cut when it has neither a recommendation nor an applied decision yet. */
  reviewPendingSince: string | null;
  lastRecommendation: { decision: string; on: string } | null;
};

export async function committeeStates(db: Db, cohortIds: string[]): Promise<Map<string, CommitteeState>> {
  if (cohortIds.length === 0) return new Map();
  const { rows } = await db.raw(
    `with cuts as (
       select c.id as cohort_id, d.id as cut_id, d.cut_at
         from cohorts c
         join data_cuts d on d.trial_id = c.trial_id and (d.cohort_id = c.id or d.cohort_id is null)
        where c.id = any(?::uuid[]))
     select c.id as cohort_id,
            latest.cut_at as latest_cut_at,
            latest.reviewed,
            rec.decision, rec.created_at as decided_at
       from cohorts c
       left join lateral (
         select cuts.cut_at,
                exists (select 1 from recommendations r where r.data_cut_id = cuts.cut_id)
                or exists (select 1 from data_cut_decisions x where x.data_cut_id = cuts.cut_id and x.cohort_id = c.id) as reviewed
           from cuts where cuts.cohort_id = c.id
          order by cuts.cut_at desc limit 1) latest on true
       left join lateral (
         select r.decision, r.created_at
           from cuts join recommendations r on r.data_cut_id = cuts.cut_id
          where cuts.cohort_id = c.id
          order by r.created_at desc limit 1) rec on true
      where c.id = any(?::uuid[])`,
    [cohortIds, cohortIds],
  );
  const day = (value: Date | null) => (value ? value.toISOString().slice(0, 10) : null);
  return new Map(
    rows.map((row: { cohort_id: string; latest_cut_at: Date | null; reviewed: boolean | null; decision: string | null; decided_at: Date | null }) => [
      row.cohort_id,
      {
        cohortId: row.cohort_id,
        reviewPendingSince: row.latest_cut_at && !row.reviewed ? day(row.latest_cut_at) : null,
        lastRecommendation: row.decision && row.decided_at ? { decision: row.decision, on: day(row.decided_at) as string } : null,
      },
    ]),
  );
}
