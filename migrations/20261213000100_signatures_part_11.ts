/**
 * Electronic signatures that mean what they say (21 CFR Part 11 §11.50, §11.100, §11.200):
 * - `signing_authentications`: one password entry at the identity provider for one signing intent
 *   (what is about to be signed), usable once, for a few minutes; a signature references the one it
 *   consumed (unique), so two signatures can never rest on one authentication;
 * - signatures keep the signer's printed name; signatures, design versions and recommendations are
 *   append-only (no UPDATE, DELETE or TRUNCATE);
 * - a data cut's analysis settings (the prior) become numbered, append-only analysis versions; a
 *   recommendation points at the version it signed; reports are kept per report version with their
 *   bytes and hash;
 * - an attested outcome cannot change while its attestation stands;
 * - trial-manager grants made from the command line on an empty installation.
 * Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

const INTENTS = ['design', 'amendment', 'attestation', 'recommendation'];

const appendOnly = async (knex: Knex, table: string) => {
  await knex.raw(`create trigger ${table}_append_only before update or delete on ${table} for each row execute function reject_audit_change()`);
  await knex.raw(`create trigger ${table}_no_truncate before truncate on ${table} for each statement execute function reject_audit_change()`);
};

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('signing_authentications', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('user_id').notNullable().references('users.id');
    /** The browser session that asked for it: another session of the same person cannot use it. */
    t.text('session_id').notNullable();
    t.text('intent_type').notNullable();
    t.uuid('intent_subject_id').notNullable();
    /** The person's name as the identity provider gave it at this authentication. */
    t.text('signer_name').notNullable();
    /** auth_time of the ID token: when the password was entered. */
    t.timestamp('authenticated_at', { useTz: true }).notNullable();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('consumed_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`alter table signing_authentications add constraint signing_authentications_intent check (intent_type in (${INTENTS.map((i) => `'${i}'`).join(', ')}))`);
  await knex.raw(
    'create index signing_authentications_open on signing_authentications (user_id, session_id, intent_type, intent_subject_id) where consumed_at is null',
  );
  await knex.raw(`
    create function signing_authentication_used_once() returns trigger language plpgsql as $$
    begin
      if tg_op <> 'UPDATE' then
        raise exception 'signing authentications are kept: % is not allowed', tg_op;
      end if;
      if old.consumed_at is not null
         or new.consumed_at is null
         or (new.id, new.user_id, new.session_id, new.intent_type, new.intent_subject_id, new.signer_name, new.authenticated_at, new.expires_at, new.created_at)
            is distinct from
            (old.id, old.user_id, old.session_id, old.intent_type, old.intent_subject_id, old.signer_name, old.authenticated_at, old.expires_at, old.created_at) then
        raise exception 'a signing authentication is consumed once and otherwise never changes';
      end if;
      return new;
    end $$`);
  await knex.raw(`
    create trigger signing_authentications_used_once before update or delete on signing_authentications
    for each row execute function signing_authentication_used_once()`);
  await knex.raw(`
    create trigger signing_authentications_no_truncate before truncate on signing_authentications
    for each statement execute function reject_audit_change()`);

  await knex.schema.alterTable('signatures', (t) => {
    t.text('signer_name');
    t.uuid('signing_authentication_id').unique().references('signing_authentications.id');
  });
  // Rows signed before this migration have neither; every new one must (NOT VALID spares the old rows only).
  await knex.raw('alter table signatures add constraint signatures_signer_name check (signer_name is not null) not valid');
  await knex.raw('alter table signatures add constraint signatures_authentication check (signing_authentication_id is not null) not valid');
  await knex.raw(`
    create function signature_rests_on_authentication() returns trigger language plpgsql as $$
    declare
      auth signing_authentications%rowtype;
    begin
      select * into auth from signing_authentications where id = new.signing_authentication_id;
      if auth.id is null or auth.consumed_at is null or auth.user_id <> new.signer_user_id then
        raise exception 'a signature must rest on a signing authentication of its signer, consumed for it';
      end if;
      return new;
    end $$`);
  await knex.raw(`
    create trigger signatures_rest_on_authentication before insert on signatures
    for each row execute function signature_rests_on_authentication()`);
  await knex.raw('create trigger signatures_no_truncate before truncate on signatures for each statement execute function reject_audit_change()');
  await appendOnly(knex, 'design_versions');
  await knex.raw('create trigger recommendations_no_truncate before truncate on recommendations for each statement execute function reject_audit_change()');

  await knex.schema.createTable('analysis_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.integer('version').notNullable();
    // Null a/b: the stated default, Beta(p0, 1 − p0) per cohort.
    t.double('prior_a');
    t.double('prior_b');
    t.double('theta_t').notNullable();
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['data_cut_id', 'version']);
    t.unique(['id', 'data_cut_id']);
  });
  await knex.raw(
    'alter table analysis_versions add constraint analysis_versions_prior check ((prior_a is null) = (prior_b is null) and (prior_a is null or (prior_a > 0 and prior_b > 0)))',
  );
  await knex.raw('alter table analysis_versions add constraint analysis_versions_theta check (theta_t > 0 and theta_t < 1)');
  await appendOnly(knex, 'analysis_versions');
  // The history before versions were kept is in the audit trail; each cut starts from its current setting.
  await knex.raw(`
    insert into analysis_versions (data_cut_id, version, prior_a, prior_b, theta_t, created_by, created_at)
    select id, 1, prior_a, prior_b, theta_t, created_by, created_at from data_cuts`);
  // Every cut is born with analysis version 1 (the stated default prior, θT 0.9), however it is inserted.
  await knex.raw(`
    create function data_cut_first_analysis_version() returns trigger language plpgsql as $$
    begin
      insert into analysis_versions (data_cut_id, version, prior_a, prior_b, theta_t, created_by)
      values (new.id, 1, null, null, 0.9, new.created_by);
      return new;
    end $$`);
  await knex.raw(`
    create trigger data_cuts_first_analysis_version after insert on data_cuts
    for each row execute function data_cut_first_analysis_version()`);

  await knex.schema.alterTable('recommendations', (t) => {
    t.uuid('analysis_version_id');
  });
  await knex.raw('alter table recommendations disable trigger recommendations_append_only');
  await knex.raw(`
    update recommendations r set analysis_version_id = a.id
      from analysis_versions a where a.data_cut_id = r.data_cut_id and a.version = 1`);
  await knex.raw('alter table recommendations enable trigger recommendations_append_only');
  await knex.raw('alter table recommendations alter column analysis_version_id set not null');
  await knex.raw(
    'alter table recommendations add constraint recommendations_analysis_version foreign key (analysis_version_id, data_cut_id) references analysis_versions (id, data_cut_id)',
  );

  await knex.schema.createTable('data_cut_reports', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    /** Numbered per cut: report version 1, 2 … */
    t.integer('seq').notNullable();
    t.uuid('analysis_version_id').notNullable();
    /** With the analysis version, what the report covers: the recommendations and decisions signed and applied by then. */
    t.integer('recommendation_count').notNullable();
    t.integer('decision_count').notNullable();
    t.text('sha256').notNullable();
    t.binary('pdf').notNullable();
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['data_cut_id', 'seq']);
    t.unique(['data_cut_id', 'analysis_version_id', 'recommendation_count', 'decision_count']);
  });
  await knex.raw(
    'alter table data_cut_reports add constraint data_cut_reports_analysis_version foreign key (analysis_version_id, data_cut_id) references analysis_versions (id, data_cut_id)',
  );
  await appendOnly(knex, 'data_cut_reports');

  await knex.schema.alterTable('data_cuts', (t) => {
    t.dropColumn('prior_a');
    t.dropColumn('prior_b');
    t.dropColumn('theta_t');
    t.dropColumn('report_hash');
    t.dropColumn('version');
  });

  await knex.raw(`
    create function attestation_follows_outcome() returns trigger language plpgsql as $$
    begin
      if new.attestation_signature_id is not null
         and new.attestation_signature_id = old.attestation_signature_id
         and (new.outcome, new.best_overall_response, new.response_assessed_on, new.evaluable, new.not_evaluable_reason)
             is distinct from
             (old.outcome, old.best_overall_response, old.response_assessed_on, old.evaluable, old.not_evaluable_reason) then
        raise exception 'an attested outcome cannot change while its attestation stands: clear the attestation in the same change';
      end if;
      return new;
    end $$`);
  await knex.raw(`
    create trigger patients_attestation_follows_outcome before update on patients
    for each row execute function attestation_follows_outcome()`);

  // Who may create sites and trials on an installation where nobody manages a trial yet.
  await knex.schema.createTable('trial_manager_grants', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('email').notNullable();
    /** Set at the person's first sign-in (or at once when they signed in before). */
    t.uuid('user_id').references('users.id');
    t.text('granted_from').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('create unique index trial_manager_grants_email on trial_manager_grants (lower(email))');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('trial_manager_grants');
  await knex.raw('drop trigger patients_attestation_follows_outcome on patients');
  await knex.raw('drop function attestation_follows_outcome()');

  await knex.schema.alterTable('data_cuts', (t) => {
    t.double('prior_a');
    t.double('prior_b');
    t.double('theta_t').notNullable().defaultTo(0.9);
    t.text('report_hash');
    t.integer('version').notNullable().defaultTo(1);
  });
  // data_cut_frozen() lets these columns change: the latest version's setting and the latest report's hash go back.
  await knex.raw(`
    update data_cuts d set prior_a = a.prior_a, prior_b = a.prior_b, theta_t = a.theta_t, version = a.version
      from (select distinct on (data_cut_id) * from analysis_versions order by data_cut_id, version desc) a
     where a.data_cut_id = d.id`);
  await knex.raw(`
    update data_cuts d set report_hash = r.sha256
      from (select distinct on (data_cut_id) * from data_cut_reports order by data_cut_id, seq desc) r
     where r.data_cut_id = d.id`);
  await knex.raw(
    'alter table data_cuts add constraint data_cuts_prior check ((prior_a is null) = (prior_b is null) and (prior_a is null or (prior_a > 0 and prior_b > 0)))',
  );
  await knex.raw('alter table data_cuts add constraint data_cuts_theta check (theta_t > 0 and theta_t < 1)');

  await knex.schema.dropTable('data_cut_reports');
  await knex.raw('alter table recommendations drop constraint recommendations_analysis_version');
  await knex.raw('alter table recommendations drop column analysis_version_id');
  await knex.raw('drop trigger data_cuts_first_analysis_version on data_cuts');
  await knex.raw('drop function data_cut_first_analysis_version()');
  await knex.schema.dropTable('analysis_versions');

  await knex.raw('drop trigger recommendations_no_truncate on recommendations');
  await knex.raw('drop trigger design_versions_append_only on design_versions');
  await knex.raw('drop trigger design_versions_no_truncate on design_versions');
  await knex.raw('drop trigger signatures_no_truncate on signatures');
  await knex.raw('drop trigger signatures_rest_on_authentication on signatures');
  await knex.raw('drop function signature_rests_on_authentication()');
  await knex.raw('alter table signatures drop constraint signatures_authentication');
  await knex.raw('alter table signatures drop constraint signatures_signer_name');
  await knex.schema.alterTable('signatures', (t) => {
    t.dropColumn('signing_authentication_id');
    t.dropColumn('signer_name');
  });
  await knex.schema.dropTable('signing_authentications');
  await knex.raw('drop function signing_authentication_used_once()');
}
