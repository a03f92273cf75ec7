/**
 * Foundation schema: people, sites, trials and their cohorts, memberships, sessions, the
 * append-only audit log, electronic signatures, the mail queue and scheduled-job claims, plus the
 * design versions and patients that the first features build on.
 * Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

const ROLES = ['admin', 'statistician', 'coordinator', 'investigator', 'monitor', 'sponsor'];
const COHORT_STATUSES = [
  'draft',
  'enrolling_stage_1',
  'interim_review',
  'enrolling_stage_2',
  'final_analysis',
  'completed',
  'stopped',
];
const RESPONSES = ['CR', 'PR', 'SD', 'PD', 'NE'];

function inList(column: string, values: string[]): string {
  return `${column} in (${values.map((v) => `'${v}'`).join(', ')})`;
}

export async function up(knex: Knex): Promise<void> {
  await knex.raw('create extension if not exists pgcrypto');

  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('subject').unique();
    t.text('email').notNullable();
    t.text('name');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('last_sign_in_at', { useTz: true });
  });
  await knex.raw('create unique index users_email_lower on users (lower(email))');

  await knex.schema.createTable('sites', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('code').notNullable().unique();
    t.text('name').notNullable();
    t.text('country').notNullable();
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`alter table sites add constraint sites_code_format check (code ~ '^[A-Z0-9]{2,8}$')`);

  await knex.schema.createTable('trials', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('code').notNullable().unique();
    t.text('title').notNullable();
    t.text('indication').notNullable();
    t.text('endpoint_definition').notNullable();
    t.integer('planned_accrual_per_month');
    t.date('start_date');
    t.text('sponsor_name');
    // Protocol settings for outcomes: entered directly, or derived from timepoint assessments
    // (RECIST 1.1) with the confirmation and stable-disease rules below.
    t.text('outcome_source').notNullable().defaultTo('entered');
    t.boolean('confirmation_required').notNullable().defaultTo(true);
    t.integer('confirmation_min_days').notNullable().defaultTo(28);
    t.integer('sd_min_days').notNullable().defaultTo(42);
    t.text('ne_between_responses').notNullable().defaultTo('ignore');
    t.integer('assessment_interval_days').notNullable().defaultTo(56);
    t.integer('inactivity_warning_weeks').notNullable().defaultTo(6);
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.raw(`alter table trials add constraint trials_outcome_source check (${inList('outcome_source', ['entered', 'derived'])})`);
  await knex.raw(
    `alter table trials add constraint trials_ne_between check (${inList('ne_between_responses', ['ignore', 'breaks_confirmation'])})`,
  );

  await knex.schema.createTable('trial_sites', (t) => {
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.uuid('site_id').notNullable().references('sites.id');
    t.integer('planned_accrual_per_month');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['trial_id', 'site_id']);
  });

  await knex.schema.createTable('cohorts', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.text('code').notNullable();
    t.text('name').notNullable();
    t.integer('position').notNullable().defaultTo(1);
    t.text('status').notNullable().defaultTo('draft');
    t.text('stop_category');
    t.text('stop_reason');
    t.timestamp('status_changed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['trial_id', 'code']);
  });
  await knex.raw(`alter table cohorts add constraint cohorts_status check (${inList('status', COHORT_STATUSES)})`);
  await knex.raw(
    `alter table cohorts add constraint cohorts_stop_category check (stop_category is null or ${inList('stop_category', [
      'futility',
      'efficacy',
      'safety',
      'sponsor',
      'other',
    ])})`,
  );

  await knex.schema.createTable('memberships', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.uuid('user_id').references('users.id');
    t.text('email').notNullable();
    t.text('role').notNullable();
    t.uuid('site_id').references('sites.id');
    t.text('status').notNullable().defaultTo('pending');
    t.uuid('invited_by').references('users.id');
    t.integer('version').notNullable().defaultTo(1);
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`alter table memberships add constraint memberships_role check (${inList('role', ROLES)})`);
  await knex.raw(`alter table memberships add constraint memberships_status check (${inList('status', ['pending', 'active'])})`);
  await knex.raw(
    `alter table memberships add constraint memberships_site_roles check (
       (role in ('coordinator', 'investigator')) = (site_id is not null))`,
  );
  await knex.raw(
    `create unique index memberships_unique on memberships (trial_id, lower(email), role,
       coalesce(site_id, '00000000-0000-0000-0000-000000000000'::uuid))`,
  );
  await knex.raw('create index memberships_user on memberships (user_id)');

  // express-session store (connect-pg-simple's documented table)
  await knex.raw(`
    create table session (
      sid varchar not null primary key,
      sess json not null,
      expire timestamp(6) not null
    )`);
  await knex.raw('create index session_expire on session (expire)');

  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid('actor_user_id').references('users.id');
    t.uuid('trial_id');
    t.text('entity_type').notNullable();
    t.text('entity_id').notNullable();
    t.text('action').notNullable();
    t.jsonb('before');
    t.jsonb('after');
    t.text('reason');
  });
  await knex.raw('create index audit_log_entity on audit_log (entity_type, entity_id)');
  await knex.raw('create index audit_log_trial on audit_log (trial_id, at)');
  await knex.raw(`
    create function reject_audit_change() returns trigger language plpgsql as $$
    begin
      raise exception 'audit_log is append-only: % is not allowed', tg_op;
    end $$`);
  await knex.raw(`
    create trigger audit_log_append_only before update or delete on audit_log
    for each row execute function reject_audit_change()`);
  await knex.raw(`
    create trigger audit_log_no_truncate before truncate on audit_log
    for each statement execute function reject_audit_change()`);

  await knex.schema.createTable('signatures', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id');
    t.uuid('signer_user_id').notNullable().references('users.id');
    t.text('signer_email').notNullable();
    t.text('meaning').notNullable();
    t.text('subject_type').notNullable();
    t.text('subject_id').notNullable();
    t.text('content_hash').notNullable();
    t.timestamp('authenticated_at', { useTz: true }).notNullable();
    t.timestamp('signed_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`
    create trigger signatures_append_only before update or delete on signatures
    for each row execute function reject_audit_change()`);

  await knex.schema.createTable('mail_outbox', (t) => {
    t.bigIncrements('id');
    t.text('kind').notNullable();
    t.text('to_address').notNullable();
    t.text('subject').notNullable();
    t.text('body_text').notNullable();
    t.text('status').notNullable().defaultTo('queued');
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('last_error');
    t.text('dedupe_key').unique();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('sent_at', { useTz: true });
  });
  await knex.raw(`alter table mail_outbox add constraint mail_outbox_status check (${inList('status', ['queued', 'sending', 'sent'])})`);
  await knex.raw(`create index mail_outbox_due on mail_outbox (next_attempt_at) where status <> 'sent'`);

  // One row per (job, period): the primary key makes a scheduled job run once per period even
  // when several server processes race for it.
  await knex.schema.createTable('job_runs', (t) => {
    t.text('job').notNullable();
    t.text('period').notNullable();
    t.timestamp('started_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('finished_at', { useTz: true });
    t.primary(['job', 'period']);
  });

  await knex.schema.createTable('design_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('cohort_id').notNullable().references('cohorts.id').onDelete('cascade');
    t.integer('version').notNullable();
    t.text('selection').notNullable();
    t.decimal('p0', 6, 4).notNullable();
    t.decimal('p1', 6, 4).notNullable();
    t.decimal('alpha', 6, 4).notNullable();
    t.decimal('beta', 6, 4).notNullable();
    t.integer('nmax');
    t.integer('r1');
    t.integer('n1');
    t.integer('r').notNullable();
    t.integer('n').notNullable();
    t.double('en0');
    t.double('pet0');
    t.double('type_i_error').notNullable();
    t.double('power').notNullable();
    t.text('analysis_population').notNullable().defaultTo('all_enrolled');
    t.text('interim_accrual').notNullable().defaultTo('pause');
    t.boolean('sponsor_sees_response').notNullable().defaultTo(false);
    t.text('protocol_reference');
    t.text('amendment_reason');
    t.uuid('signature_id').references('signatures.id');
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['cohort_id', 'version']);
  });
  await knex.raw(
    `alter table design_versions add constraint design_versions_selection check (${inList('selection', [
      'single_stage',
      'optimal',
      'minimax',
      'admissible',
    ])})`,
  );
  await knex.raw(`alter table design_versions add constraint design_versions_two_stage check ((r1 is null) = (n1 is null))`);
  await knex.raw(
    `alter table design_versions add constraint design_versions_population check (${inList('analysis_population', [
      'all_enrolled',
      'evaluable',
    ])})`,
  );
  await knex.raw(
    `alter table design_versions add constraint design_versions_interim check (${inList('interim_accrual', [
      'pause',
      'continue_at_risk',
    ])})`,
  );

  await knex.schema.createTable('patients', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.uuid('cohort_id').notNullable().references('cohorts.id');
    t.uuid('site_id').notNullable().references('sites.id');
    t.text('study_id').notNullable();
    t.date('enrolled_on').notNullable();
    t.integer('enrolment_seq').notNullable();
    t.integer('stage').notNullable().defaultTo(1);
    t.text('outcome').notNullable().defaultTo('pending');
    t.text('best_overall_response');
    t.date('response_assessed_on');
    t.boolean('evaluable').notNullable().defaultTo(true);
    t.text('not_evaluable_reason');
    t.uuid('attestation_signature_id').references('signatures.id');
    t.text('derived_best_overall_response');
    t.boolean('derived_responder');
    t.jsonb('derivation');
    /** Set when the entered outcome disagrees with the one derived from assessments. */
    t.text('outcome_flag');
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['trial_id', 'study_id']);
    t.unique(['cohort_id', 'enrolment_seq']);
  });
  await knex.raw(`alter table patients add constraint patients_outcome check (${inList('outcome', ['pending', 'responder', 'non_responder'])})`);
  await knex.raw(
    `alter table patients add constraint patients_bor check (best_overall_response is null or ${inList('best_overall_response', RESPONSES)})`,
  );
  await knex.raw(
    `alter table patients add constraint patients_outcome_bor check (
       (outcome = 'pending' and best_overall_response is null)
       or (outcome = 'responder' and best_overall_response in ('CR', 'PR'))
       or (outcome = 'non_responder' and best_overall_response in ('SD', 'PD', 'NE')))`,
  );
  await knex.raw(`alter table patients add constraint patients_response_date check (response_assessed_on is null or response_assessed_on >= enrolled_on)`);
  await knex.raw(`alter table patients add constraint patients_stage check (stage in (1, 2))`);
  await knex.raw(`alter table patients add constraint patients_evaluable_reason check (evaluable or not_evaluable_reason is not null)`);
  await knex.raw(
    `alter table patients add constraint patients_derived_bor check (derived_best_overall_response is null or ${inList('derived_best_overall_response', RESPONSES)})`,
  );
  await knex.raw('create index patients_trial_site on patients (trial_id, site_id)');
  await knex.raw('create index patients_cohort on patients (cohort_id, enrolled_on)');

  await knex.schema.createTable('assessments', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('patient_id').notNullable().references('patients.id').onDelete('cascade');
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.date('assessed_on').notNullable();
    t.text('response').notNullable();
    t.text('notes');
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['patient_id', 'assessed_on']);
  });
  await knex.raw(`alter table assessments add constraint assessments_response check (${inList('response', RESPONSES)})`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('assessments');
  await knex.schema.dropTable('patients');
  await knex.schema.dropTable('design_versions');
  await knex.schema.dropTable('job_runs');
  await knex.schema.dropTable('mail_outbox');
  await knex.schema.dropTable('signatures');
  await knex.schema.dropTable('audit_log');
  await knex.raw('drop function reject_audit_change()');
  await knex.schema.dropTable('session');
  await knex.schema.dropTable('memberships');
  await knex.schema.dropTable('cohorts');
  await knex.schema.dropTable('trial_sites');
  await knex.schema.dropTable('trials');
  await knex.schema.dropTable('sites');
  await knex.schema.dropTable('users');
}
