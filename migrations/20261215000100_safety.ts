/**
 * Safety co-monitoring: adverse events per patient (CTCAE v5.0 grade, attribution to the agent,
 * seriousness, outcome), the safety rule a design version locks (the protocol's toxicity
 * definition with a continuous toxicity boundary or a Bryant–Day design), the pause of a cohort's
 * accrual when the rule is crossed, and the committee's recommendations and decisions that end it.
 * Frozen in time: never import application code here.
 */
import type { Knex } from 'knex';

function inList(column: string, values: string[]): string {
  return `${column} in (${values.map((v) => `'${v}'`).join(', ')})`;
}

const ATTRIBUTIONS = ['unrelated', 'unlikely', 'possible', 'probable', 'definite'];
const EVENT_OUTCOMES = ['recovered', 'recovering', 'not_recovered', 'recovered_with_sequelae', 'fatal', 'unknown'];
const SAFETY_RULES = ['none', 'toxicity_boundary', 'bryant_day'];

const RECOMMENDATIONS_BEFORE = ['continue', 'stop_futility', 'stop_other', 'modify_protocol'];
const RECOMMENDATIONS_AFTER = [...RECOMMENDATIONS_BEFORE, 'resume_accrual', 'stop_safety'];
const DECISIONS_BEFORE = ['resume_stage_2', 'stop', 'final_analysis', 'complete'];
const DECISIONS_AFTER = [...DECISIONS_BEFORE, 'resume_accrual'];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('adverse_events', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('trial_id').notNullable().references('trials.id').onDelete('cascade');
    t.uuid('patient_id').notNullable().references('patients.id').onDelete('cascade');
    t.date('onset_on').notNullable();
    /** The term as the site reported it (verbatim). */
    t.text('term').notNullable();
    /** CTCAE v5.0 grade; null until the investigator grades it. */
    t.integer('grade');
    /** Attribution to the agent; null until assessed. */
    t.text('attribution');
    t.boolean('serious').notNullable().defaultTo(false);
    t.text('outcome').notNullable().defaultTo('unknown');
    t.text('notes');
    t.uuid('attestation_signature_id').references('signatures.id');
    t.integer('version').notNullable().defaultTo(1);
    t.uuid('created_by').references('users.id');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw('alter table adverse_events add constraint adverse_events_grade check (grade is null or grade between 1 and 5)');
  await knex.raw(`alter table adverse_events add constraint adverse_events_attribution check (attribution is null or ${inList('attribution', ATTRIBUTIONS)})`);
  await knex.raw(`alter table adverse_events add constraint adverse_events_outcome check (${inList('outcome', EVENT_OUTCOMES)})`);
  await knex.raw(`alter table adverse_events add constraint adverse_events_fatal check (grade is null or (outcome = 'fatal') = (grade = 5))`);
  await knex.raw('create index adverse_events_patient on adverse_events (patient_id, onset_on)');
  await knex.raw('create index adverse_events_trial on adverse_events (trial_id)');

  await knex.schema.alterTable('design_versions', (t) => {
    t.text('safety_rule').notNullable().defaultTo('none');
    // The protocol's toxicity definition: grade at or above tox_min_grade, attribution possible or
    // stronger, onset within tox_window_days of enrolment.
    t.integer('tox_min_grade');
    t.integer('tox_window_days');
    // Continuous toxicity boundary (Pocock type) over the design's n patients.
    t.double('tox_theta');
    t.double('tox_alpha');
    t.jsonb('tox_bounds');
    t.double('tox_nominal_level');
    t.double('tox_crossing_probability');
    // Bryant–Day: the toxicity rates, the toxicity error level and the toxicity cut-offs.
    t.double('tox_acceptable');
    t.double('tox_unacceptable');
    t.double('alpha_t');
    t.integer('t1');
    t.integer('t');
    t.double('attained_alpha_t');
    t.double('en_high_toxicity');
  });
  await knex.raw(`alter table design_versions add constraint design_versions_safety_rule check (${inList('safety_rule', SAFETY_RULES)})`);
  await knex.raw(
    `alter table design_versions add constraint design_versions_toxicity_definition check (
       (safety_rule = 'none') = (tox_min_grade is null)
       and (tox_min_grade is null) = (tox_window_days is null)
       and (tox_min_grade is null or tox_min_grade between 1 and 5)
       and (tox_window_days is null or tox_window_days between 1 and 730))`,
  );
  await knex.raw(
    `alter table design_versions add constraint design_versions_toxicity_boundary check (
       (safety_rule = 'toxicity_boundary') = (tox_bounds is not null and tox_theta is not null and tox_alpha is not null))`,
  );
  await knex.raw(
    `alter table design_versions add constraint design_versions_bryant_day check (
       (safety_rule = 'bryant_day') = (t1 is not null and t is not null and tox_acceptable is not null and tox_unacceptable is not null and alpha_t is not null)
       and (safety_rule <> 'bryant_day' or n1 is not null))`,
  );

  await knex.schema.alterTable('cohorts', (t) => {
    /** Set while accrual is paused because the safety rule was crossed. */
    t.timestamp('safety_paused_at', { useTz: true });
    t.text('safety_pause_reason');
    /** The toxicities counted when the pause began. */
    t.integer('safety_pause_toxicities');
    /** The toxicities the committee had reviewed when accrual last resumed after a safety pause. */
    t.integer('safety_reviewed_toxicities');
  });
  await knex.raw(
    `alter table cohorts add constraint cohorts_safety_pause check (
       (safety_paused_at is null) = (safety_pause_reason is null) and (safety_paused_at is null) = (safety_pause_toxicities is null))`,
  );

  await knex.raw('alter table recommendations drop constraint recommendations_decision');
  await knex.raw(`alter table recommendations add constraint recommendations_decision check (${inList('decision', RECOMMENDATIONS_AFTER)})`);
  await knex.raw('alter table data_cut_decisions drop constraint data_cut_decisions_action');
  await knex.raw(`alter table data_cut_decisions add constraint data_cut_decisions_action check (${inList('action', DECISIONS_AFTER)})`);
}

export async function down(knex: Knex): Promise<void> {
  // Recommendations and decisions are append-only: a safety one recorded since makes the narrower check fail, and down stops there.
  await knex.raw('alter table data_cut_decisions drop constraint data_cut_decisions_action');
  await knex.raw(`alter table data_cut_decisions add constraint data_cut_decisions_action check (${inList('action', DECISIONS_BEFORE)})`);
  await knex.raw('alter table recommendations drop constraint recommendations_decision');
  await knex.raw(`alter table recommendations add constraint recommendations_decision check (${inList('decision', RECOMMENDATIONS_BEFORE)})`);

  await knex.raw('alter table cohorts drop constraint cohorts_safety_pause');
  await knex.schema.alterTable('cohorts', (t) => {
    t.dropColumns('safety_paused_at', 'safety_pause_reason', 'safety_pause_toxicities', 'safety_reviewed_toxicities');
  });

  await knex.raw('alter table design_versions drop constraint design_versions_bryant_day');
  await knex.raw('alter table design_versions drop constraint design_versions_toxicity_boundary');
  await knex.raw('alter table design_versions drop constraint design_versions_toxicity_definition');
  await knex.raw('alter table design_versions drop constraint design_versions_safety_rule');
  await knex.schema.alterTable('design_versions', (t) => {
    t.dropColumns(
      'safety_rule',
      'tox_min_grade',
      'tox_window_days',
      'tox_theta',
      'tox_alpha',
      'tox_bounds',
      'tox_nominal_level',
      'tox_crossing_probability',
      'tox_acceptable',
      'tox_unacceptable',
      'alpha_t',
      't1',
      't',
      'attained_alpha_t',
      'en_high_toxicity',
    );
  });

  await knex.schema.dropTable('adverse_events');
}
