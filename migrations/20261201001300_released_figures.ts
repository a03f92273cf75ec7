/**
 * What a committee decision released to sponsors and site staff: one row per (data cut, cohort),
 * holding that cohort's figures as the cut's analysis computed them at the release. Later outcomes
 * never move released figures, and the Portfolio and the weekly digest read them without analysing
 * the cut again. Append-only, like the decisions that create them. Frozen in time: never import
 * application code here.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('released_figures', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.uuid('cohort_id').notNullable().references('cohorts.id');
    t.uuid('decision_id').notNullable().references('data_cut_decisions.id');
    t.integer('cut_seq').notNullable();
    t.text('cut_kind').notNullable();
    t.timestamp('cut_at', { useTz: true }).notNullable();
    t.timestamp('released_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.jsonb('figures').notNullable();
    t.unique(['data_cut_id', 'cohort_id']);
  });
  await knex.raw('create index released_figures_latest on released_figures (cohort_id, cut_at desc, released_at desc)');
  await knex.raw(`
    create trigger released_figures_append_only before update or delete on released_figures
    for each row execute function reject_audit_change()`);
  await knex.raw(`
    create trigger released_figures_no_truncate before truncate on released_figures
    for each statement execute function reject_audit_change()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('released_figures');
}
