/**
 * Data cuts: a frozen copy of every patient (and their timepoint assessments) in a cut's scope, the
 * committee's signed recommendations on it, and the decisions applied to the cohorts afterwards.
 * The copied patients, the recommendations and the decisions are append-only (database triggers),
 * and the identity of a cut (its scope, time, counts and content hash) cannot be changed.
 * Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

function inList(column: string, values: string[]): string {
  return `${column} in (${values.map((v) => `'${v}'`).join(', ')})`;
}

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('data_cuts', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id');
    /** Null: the whole trial, every cohort. */
    t.uuid('cohort_id').references('cohorts.id');
    /** Numbered per trial, for people: "data cut 3". */
    t.integer('seq').notNullable();
    t.text('kind').notNullable();
    /** The design in force for a single-cohort cut; every cohort's is in `snapshot`. */
    t.uuid('design_version_id').references('design_versions.id');
    t.jsonb('snapshot').notNullable();
    t.timestamp('cut_at', { useTz: true }).notNullable();
    t.uuid('created_by').references('users.id');
    t.text('content_hash').notNullable();
    t.integer('patient_count').notNullable();
    t.integer('pending_count').notNullable();
    t.integer('unattested_count').notNullable();
    t.integer('flagged_count').notNullable();
    t.integer('not_evaluable_count').notNullable();
    t.text('report_hash');
    // Prior for the Bayesian figures: null a/b means the stated default, Beta(p0, 1 − p0) per cohort.
    t.double('prior_a');
    t.double('prior_b');
    t.double('theta_t').notNullable().defaultTo(0.9);
    t.timestamp('released_to_sponsor_at', { useTz: true });
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['trial_id', 'seq']);
  });
  await knex.raw(`alter table data_cuts add constraint data_cuts_kind check (${inList('kind', ['interim', 'final'])})`);
  await knex.raw(`alter table data_cuts add constraint data_cuts_prior check ((prior_a is null) = (prior_b is null) and (prior_a is null or (prior_a > 0 and prior_b > 0)))`);
  await knex.raw(`alter table data_cuts add constraint data_cuts_theta check (theta_t > 0 and theta_t < 1)`);
  await knex.raw('create index data_cuts_trial on data_cuts (trial_id, cut_at)');
  await knex.raw(`
    create function data_cut_frozen() returns trigger language plpgsql as $$
    begin
      if tg_op = 'DELETE' then
        raise exception 'data cuts are kept: DELETE is not allowed';
      end if;
      if (new.trial_id, new.cohort_id, new.seq, new.kind, new.design_version_id, new.snapshot, new.cut_at, new.created_by,
          new.content_hash, new.patient_count, new.pending_count, new.unattested_count, new.flagged_count, new.not_evaluable_count)
         is distinct from
         (old.trial_id, old.cohort_id, old.seq, old.kind, old.design_version_id, old.snapshot, old.cut_at, old.created_by,
          old.content_hash, old.patient_count, old.pending_count, old.unattested_count, old.flagged_count, old.not_evaluable_count) then
        raise exception 'a data cut is frozen: its scope, time, counts and content hash cannot change';
      end if;
      return new;
    end $$`);
  await knex.raw(`
    create trigger data_cuts_frozen before update or delete on data_cuts
    for each row execute function data_cut_frozen()`);

  await knex.schema.createTable('data_cut_patients', (t) => {
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.uuid('patient_id').notNullable();
    t.text('study_id').notNullable();
    t.uuid('site_id').notNullable();
    t.text('site_code').notNullable();
    t.uuid('cohort_id').notNullable();
    t.text('cohort_code').notNullable();
    t.integer('stage').notNullable();
    t.integer('enrolment_seq').notNullable();
    t.date('enrolled_on').notNullable();
    t.text('outcome').notNullable();
    t.text('best_overall_response');
    t.date('response_assessed_on');
    t.boolean('evaluable').notNullable();
    t.text('not_evaluable_reason');
    t.boolean('attested').notNullable();
    t.uuid('attestation_signature_id');
    t.text('derived_best_overall_response');
    t.boolean('derived_responder');
    t.text('outcome_flag');
    /** The patient record's version at the cut: which correction the cut saw. */
    t.integer('patient_version').notNullable();
    t.jsonb('assessments').notNullable();
    t.primary(['data_cut_id', 'patient_id']);
  });
  await knex.raw(`
    create trigger data_cut_patients_append_only before update or delete on data_cut_patients
    for each row execute function reject_audit_change()`);
  await knex.raw(`
    create trigger data_cut_patients_no_truncate before truncate on data_cut_patients
    for each statement execute function reject_audit_change()`);

  await knex.schema.createTable('recommendations', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.uuid('member_user_id').notNullable().references('users.id');
    t.text('decision').notNullable();
    t.text('rationale').notNullable();
    t.uuid('signature_id').notNullable().references('signatures.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['data_cut_id', 'member_user_id']);
  });
  await knex.raw(
    `alter table recommendations add constraint recommendations_decision check (${inList('decision', [
      'continue',
      'stop_futility',
      'stop_other',
      'modify_protocol',
    ])})`,
  );
  await knex.raw(`
    create trigger recommendations_append_only before update or delete on recommendations
    for each row execute function reject_audit_change()`);

  await knex.schema.createTable('data_cut_decisions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.uuid('cohort_id').notNullable().references('cohorts.id');
    t.text('action').notNullable();
    t.text('from_status').notNullable();
    t.text('to_status').notNullable();
    t.text('stop_category');
    t.text('reason').notNullable();
    t.uuid('applied_by').references('users.id');
    t.timestamp('applied_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['data_cut_id', 'cohort_id']);
  });
  await knex.raw(
    `alter table data_cut_decisions add constraint data_cut_decisions_action check (${inList('action', [
      'resume_stage_2',
      'stop',
      'final_analysis',
      'complete',
    ])})`,
  );
  await knex.raw(`
    create trigger data_cut_decisions_append_only before update or delete on data_cut_decisions
    for each row execute function reject_audit_change()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('data_cut_decisions');
  await knex.schema.dropTable('recommendations');
  await knex.schema.dropTable('data_cut_patients');
  await knex.schema.dropTable('data_cuts');
  await knex.raw('drop function data_cut_frozen()');
}
