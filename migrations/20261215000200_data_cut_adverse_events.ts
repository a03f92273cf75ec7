/**
 * Data cuts freeze adverse events: every event of the patients a cut froze, copied as the cut saw
 * it (append-only, like the cut's patients), so the cut's safety section, report and adverse-events
 * dataset never move with later corrections. Cuts frozen before this migration have no copies and
 * say so in their snapshot. Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('data_cut_adverse_events', (t) => {
    t.uuid('data_cut_id').notNullable().references('data_cuts.id');
    t.uuid('adverse_event_id').notNullable();
    t.uuid('patient_id').notNullable();
    t.text('study_id').notNullable();
    t.text('site_code').notNullable();
    t.uuid('cohort_id').notNullable();
    t.date('onset_on').notNullable();
    t.text('term').notNullable();
    t.integer('grade');
    t.text('attribution');
    t.boolean('serious').notNullable();
    t.text('outcome').notNullable();
    t.boolean('attested').notNullable();
    t.uuid('attestation_signature_id');
    /** The event record's version at the cut: which correction the cut saw. */
    t.integer('event_version').notNullable();
    t.primary(['data_cut_id', 'adverse_event_id']);
  });
  await knex.raw(`
    create trigger data_cut_adverse_events_append_only before update or delete on data_cut_adverse_events
    for each row execute function reject_audit_change()`);
  await knex.raw(`
    create trigger data_cut_adverse_events_no_truncate before truncate on data_cut_adverse_events
    for each statement execute function reject_audit_change()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('data_cut_adverse_events');
}
