/**
 * Builders for the Portfolio, Accrual and digest tests: dates relative to today, trial settings,
 * data cuts and committee recommendations written straight to the database, and a bulk enrolment
 * for large portfolios (one multi-row insert per cohort).
 */
import { randomUUID } from 'node:crypto';
import type { Db } from '../../server/db/knex.js';
import { addDays, toDay } from '../../server/accrual/calendar.js';
import { DEMO, ensureUser } from './factories.js';
import { recommendDirectly as recommendCut } from './data-cut-factories.js';
import type { RecommendationDecision } from '../../server/data-cuts/data-cuts.schema.js';

export const today = () => toDay(new Date());
/** The day `days` days before today. */
export const daysAgo = (days: number) => addDays(today(), -days);

export async function setTrialFields(
  db: Db,
  trialId: string,
  fields: { startDate?: string | null; plannedPerMonth?: number | null; inactivityWarningWeeks?: number; indication?: string },
): Promise<void> {
  const update: Record<string, unknown> = {};
  if (fields.startDate !== undefined) update.start_date = fields.startDate;
  if (fields.plannedPerMonth !== undefined) update.planned_accrual_per_month = fields.plannedPerMonth;
  if (fields.inactivityWarningWeeks !== undefined) update.inactivity_warning_weeks = fields.inactivityWarningWeeks;
  if (fields.indication !== undefined) update.indication = fields.indication;
  await db('trials').where({ id: trialId }).update(update);
}

export async function setSitePlan(db: Db, trialId: string, siteId: string, plannedPerMonth: number | null): Promise<void> {
  await db('trial_sites').where({ trial_id: trialId, site_id: siteId }).update({ planned_accrual_per_month: plannedPerMonth });
}

/** A data cut row of a cohort (or of the whole trial when cohortId is null) with placeholder counts and no patients: for milestones, not analyses. */
export async function cutDataDirectly(
  db: Db,
  input: { trialId: string; cohortId: string | null; kind?: 'interim' | 'final'; cutAt?: Date },
): Promise<string> {
  const [{ max }] = await db('data_cuts').where({ trial_id: input.trialId }).max({ max: 'seq' });
  const [row] = await db('data_cuts')
    .insert({
      trial_id: input.trialId,
      cohort_id: input.cohortId,
      seq: Number(max ?? 0) + 1,
      kind: input.kind ?? 'interim',
      snapshot: JSON.stringify({ fixture: true }),
      cut_at: input.cutAt ?? new Date(),
      created_by: await ensureUser(db, DEMO.statistician),
      content_hash: `fixture-${randomUUID()}`,
      patient_count: 0,
      pending_count: 0,
      unattested_count: 0,
      flagged_count: 0,
      not_evaluable_count: 0,
    })
    .returning('id');
  return row.id;
}

/** A committee recommendation on a cut, back-dated with `at` (the data-cut factories write it). */
export async function recommendDirectly(
  db: Db,
  input: { trialId: string; cutId: string; decision: RecommendationDecision; at?: Date; memberEmail?: string },
): Promise<string> {
  const cut = await db('data_cuts').where({ id: input.cutId }).first('id', 'trial_id', 'seq', 'content_hash');
  return recommendCut(db, { id: cut.id, trialId: cut.trial_id, seq: cut.seq, contentHash: cut.content_hash }, input.memberEmail ?? DEMO.monitor, input.decision, {
    rationale: 'Recorded by a test fixture.',
    at: input.at,
  });
}

/**
 * Enrols many patients at once (one insert): patient i is enrolled on `dates[i]` at
 * `siteIds[i % siteIds.length]`, with every fifth a responder, every seventh pending, the rest
 * non-responders; the first `n1` are stage 1.
 */
export async function bulkEnrol(
  db: Db,
  input: { trialId: string; cohortId: string; siteIds: string[]; siteCodes: string[]; dates: string[]; n1: number | null },
): Promise<void> {
  const rows = input.dates.map((enrolledOn, i) => {
    const outcome = i % 7 === 6 ? 'pending' : i % 5 === 0 ? 'responder' : 'non_responder';
    return {
      trial_id: input.trialId,
      cohort_id: input.cohortId,
      site_id: input.siteIds[i % input.siteIds.length],
      study_id: `${input.siteCodes[i % input.siteCodes.length]}-${String(i + 1).padStart(4, '0')}`,
      enrolled_on: enrolledOn,
      enrolment_seq: i + 1,
      stage: input.n1 === null || i < input.n1 ? 1 : 2,
      outcome,
      best_overall_response: outcome === 'responder' ? 'PR' : outcome === 'non_responder' ? 'SD' : null,
      response_assessed_on: outcome === 'pending' ? null : addDays(enrolledOn, 56) > today() ? enrolledOn : addDays(enrolledOn, 56),
    };
  });
  for (let i = 0; i < rows.length; i += 1000) await db('patients').insert(rows.slice(i, i + 1000));
}

/** Live response figures (and the committee's verdict) a sponsor must not receive unless the design allows them, and fields that would identify a patient. */
export const RESPONSE_KEYS = ['responders', 'responseRate', 'outcomesKnown', 'stage1Responders', 'lastRecommendation'];
export const PATIENT_LEVEL_KEYS = ['patients', 'patientId', 'studyId', 'study_id', 'outcome', 'bestOverallResponse', 'best_overall_response', 'enrolledOn', 'enrolmentSeq'];

/** Every object key anywhere in a JSON value, however deep. */
export function keysDeep(value: unknown, found = new Set<string>()): Set<string> {
  if (Array.isArray(value)) for (const item of value) keysDeep(item, found);
  else if (value && typeof value === 'object') {
    for (const [key, inner] of Object.entries(value)) {
      found.add(key);
      keysDeep(inner, found);
    }
  }
  return found;
}
