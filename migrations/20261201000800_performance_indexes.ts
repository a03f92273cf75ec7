/**
 * Indexes for a trial of thousands of patients under load: the live evaluation reads a cohort in
 * enrolment order with only the columns it counts (an index-only scan), and accrual by date reads
 * a trial's patients by enrolment date. Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('create index patients_cohort_counting on patients (cohort_id, enrolment_seq) include (outcome, evaluable)');
  await knex.raw('create index patients_trial_enrolled on patients (trial_id, enrolled_on)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop index if exists patients_trial_enrolled');
  await knex.raw('drop index if exists patients_cohort_counting');
}
