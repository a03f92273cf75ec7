/**
 * The live safety state's counting in SQL: each cohort's patients judged against its toxicity
 * definition and counted by status and stage, a few rows per cohort instead of every patient and
 * event. It mirrors `deriveToxicity` in toxicity.ts (which the tests compare it against).
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { RELATED_ATTRIBUTIONS, type SafetyCounts } from './safety.schema.js';

type Conn = Db | Knex.Transaction;

/** How a cohort's patients are judged: the definition of its design in force. */
export type CountingDefinition = { cohortId: string; minGrade: number; windowDays: number };

const emptyCounts = (): SafetyCounts => ({ enrolled: 0, toxic: 0, notToxic: 0, notAssessable: 0, awaitingAssessment: 0, stage1: { enrolled: 0, toxic: 0, notToxic: 0 } });

const RELATED_SQL = `(${RELATED_ATTRIBUTIONS.map((a) => `'${a}'`).join(', ')})`;

/**
 * Patients per cohort and stage: toxic (an event in the window meets the definition), not toxic
 * (window closed before `today`, no event that meets or could still meet it), awaiting an event's
 * grade or attribution; the rest are not yet assessable.
 */
export async function safetyCounts(db: Conn, definitions: CountingDefinition[], today: string): Promise<Map<string, SafetyCounts>> {
  const byCohort = new Map<string, SafetyCounts>(definitions.map((d) => [d.cohortId, emptyCounts()]));
  if (definitions.length === 0) return byCohort;
  const { rows } = await db.raw(
    `with definitions as (
       select * from unnest(?::uuid[], ?::int[], ?::int[]) as d(cohort_id, min_grade, window_days)
     ),
     judged as (
       select p.cohort_id, p.stage, (p.enrolled_on + d.window_days) as last_day,
              coalesce(bool_or(e.grade >= d.min_grade and e.attribution in ${RELATED_SQL}), false) as toxic,
              coalesce(bool_or(e.id is not null and (e.grade is null or e.attribution is null)
                               and (e.grade is null or e.grade >= d.min_grade)
                               and (e.attribution is null or e.attribution in ${RELATED_SQL})), false) as awaiting
         from patients p
         join definitions d on d.cohort_id = p.cohort_id
         left join adverse_events e on e.patient_id = p.id and e.onset_on between p.enrolled_on and p.enrolled_on + d.window_days
        group by p.id, p.cohort_id, p.stage, p.enrolled_on, d.window_days
     )
     select cohort_id, stage,
            count(*)::int as enrolled,
            count(*) filter (where toxic)::int as toxic,
            count(*) filter (where not toxic and not awaiting and last_day < ?::date)::int as not_toxic,
            count(*) filter (where not toxic and awaiting)::int as awaiting
       from judged group by cohort_id, stage`,
    [definitions.map((d) => d.cohortId), definitions.map((d) => d.minGrade), definitions.map((d) => d.windowDays), today] as Knex.RawBinding[],
  );
  for (const row of rows as Array<{ cohort_id: string; stage: number; enrolled: number; toxic: number; not_toxic: number; awaiting: number }>) {
    const counts = byCohort.get(row.cohort_id) ?? emptyCounts();
    counts.enrolled += row.enrolled;
    counts.toxic += row.toxic;
    counts.notToxic += row.not_toxic;
    counts.notAssessable += row.enrolled - row.toxic - row.not_toxic;
    counts.awaitingAssessment += row.awaiting;
    if (row.stage === 1) counts.stage1 = { enrolled: row.enrolled, toxic: row.toxic, notToxic: row.not_toxic };
    byCohort.set(row.cohort_id, counts);
  }
  return byCohort;
}
