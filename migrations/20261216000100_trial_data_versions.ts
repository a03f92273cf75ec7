/**
 * A version number per trial that every committed change to what its figures are computed from
 * moves on: its patients, cohorts, design versions, the trial row, its sites and their codes, its
 * data cuts with their recommendations, decisions and released figures. The server keys summaries
 * it keeps in memory (the live evaluation, the Portfolio's and Accrual's figures, the patient
 * list's counts) by this number, so a committed write is seen by the next read in every server process.
 *
 * The bump runs in the writing transaction itself, as a deferred trigger: it happens at commit, once
 * per trial and transaction (a transaction-local setting remembers it), so writers to one trial
 * queue only for the moment of their commit. A reader that reads the version and the data in one
 * snapshot knows exactly which data the version stands for. No foreign key: a version row outliving
 * its trial is harmless. Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

const BY_TRIAL = ['patients', 'cohorts', 'trial_sites', 'data_cuts'];
const BY_CUT = ['recommendations', 'data_cut_decisions', 'released_figures'];

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    create table trial_data_versions (
      trial_id uuid primary key,
      version bigint not null
    )`);
  await knex.raw(`
    create function bump_trial_data_version(target uuid) returns void language plpgsql as $$
    declare
      flag text := 'orrery.bumped_' || replace(target::text, '-', '');
    begin
      if coalesce(current_setting(flag, true), '') = 'yes' then
        return;
      end if;
      perform set_config(flag, 'yes', true);
      insert into trial_data_versions (trial_id, version) values (target, 1)
        on conflict (trial_id) do update set version = trial_data_versions.version + 1;
    end $$`);
  await knex.raw(`
    create function trial_data_changed() returns trigger language plpgsql as $$
    begin
      if tg_op <> 'INSERT' then
        perform bump_trial_data_version(old.trial_id);
      end if;
      if tg_op <> 'DELETE' then
        perform bump_trial_data_version(new.trial_id);
      end if;
      return null;
    end $$`);
  await knex.raw(`
    create function trial_row_changed() returns trigger language plpgsql as $$
    begin
      perform bump_trial_data_version(new.id);
      return null;
    end $$`);
  await knex.raw(`
    create function design_changed() returns trigger language plpgsql as $$
    begin
      perform bump_trial_data_version(c.trial_id) from cohorts c where c.id = new.cohort_id;
      return null;
    end $$`);
  await knex.raw(`
    create function cut_record_changed() returns trigger language plpgsql as $$
    begin
      perform bump_trial_data_version(d.trial_id) from data_cuts d where d.id = new.data_cut_id;
      return null;
    end $$`);
  await knex.raw(`
    create function site_changed() returns trigger language plpgsql as $$
    begin
      perform bump_trial_data_version(ts.trial_id) from trial_sites ts where ts.site_id = new.id;
      return null;
    end $$`);
  for (const table of BY_TRIAL) {
    await knex.raw(`
      create constraint trigger ${table}_data_version after insert or update or delete on ${table}
      deferrable initially deferred for each row execute function trial_data_changed()`);
  }
  await knex.raw(`
    create constraint trigger trials_data_version after insert or update on trials
    deferrable initially deferred for each row execute function trial_row_changed()`);
  await knex.raw(`
    create constraint trigger design_versions_data_version after insert or update on design_versions
    deferrable initially deferred for each row execute function design_changed()`);
  for (const table of BY_CUT) {
    await knex.raw(`
      create constraint trigger ${table}_data_version after insert or update on ${table}
      deferrable initially deferred for each row execute function cut_record_changed()`);
  }
  await knex.raw(`
    create constraint trigger sites_data_version after update on sites
    deferrable initially deferred for each row execute function site_changed()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('drop trigger sites_data_version on sites');
  for (const table of BY_CUT) await knex.raw(`drop trigger ${table}_data_version on ${table}`);
  await knex.raw('drop trigger design_versions_data_version on design_versions');
  await knex.raw('drop trigger trials_data_version on trials');
  for (const table of BY_TRIAL) await knex.raw(`drop trigger ${table}_data_version on ${table}`);
  await knex.raw('drop function site_changed()');
  await knex.raw('drop function cut_record_changed()');
  await knex.raw('drop function design_changed()');
  await knex.raw('drop function trial_row_changed()');
  await knex.raw('drop function trial_data_changed()');
  await knex.raw('drop function bump_trial_data_version(uuid)');
  await knex.raw('drop table trial_data_versions');
}
