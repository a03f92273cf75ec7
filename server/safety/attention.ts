/**
 * Safety's part of Needs attention, per site and site-scoped like the rest: adverse events still
 * without a grade or an attribution, serious events the investigator has not attested, and
 * patients whose toxicity window closes within a few days while no event in it counts yet (so a
 * late report still makes it in). Read in SQL; sentences from server/words.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { siteScope, type Actor } from '../auth/access.js';
import { currentDesigns } from '../designs/index.js';
import { listCohorts, listTrialSites } from '../trials/index.js';
import { eventAwaitsAssessment, seriousEventUnattested, toxicityWindowClosing } from '../words/index.js';
import { RELATED_ATTRIBUTIONS } from './safety.schema.js';
import { todayIso } from './safety-rules.js';

/** How many days ahead a closing toxicity window is flagged. */
export const WINDOW_CLOSING_DAYS = 7;

export const SAFETY_ATTENTION_KINDS = ['event-awaits-assessment', 'serious-event-unattested', 'toxicity-window-closing'] as const;
export type SafetyAttentionKind = (typeof SAFETY_ATTENTION_KINDS)[number];

export type SafetyAttentionItem = { kind: SafetyAttentionKind; message: string; date: string; patientId: string; studyId: string; eventId?: string };
export type SafetyAttentionSite = { siteId: string; siteCode: string; siteName: string; items: SafetyAttentionItem[] };

type EventRow = { id: string; patient_id: string; study_id: string; site_id: string; onset_on: string; term: string; grade: number | null; attribution: string | null; serious: boolean; attested: boolean };
type WindowRow = { patient_id: string; study_id: string; site_id: string; last_day: string };

function scoped(query: Knex.QueryBuilder, scope: string[] | 'all') {
  return scope === 'all' ? query : query.whereIn('p.site_id', scope);
}

export async function safetyAttention(db: Db, actor: Actor, today = todayIso()): Promise<{ sites: SafetyAttentionSite[]; today: string; withinDays: number }> {
  const { trialId } = actor.access;
  const scope = siteScope(actor.access);
  const sites = (await listTrialSites(db, trialId)).filter((s) => scope === 'all' || scope.includes(s.id));
  const bySite = new Map<string, SafetyAttentionSite>(sites.map((s) => [s.id, { siteId: s.id, siteCode: s.code, siteName: s.name, items: [] }]));
  const add = (siteId: string, item: SafetyAttentionItem) => bySite.get(siteId)?.items.push(item);

  const events: EventRow[] = await scoped(
    db('adverse_events as e')
      .join('patients as p', 'p.id', 'e.patient_id')
      .where('e.trial_id', trialId)
      .where((w) => {
        w.whereNull('e.grade')
          .orWhereNull('e.attribution')
          .orWhere((s) => {
            s.where('e.serious', true).whereNull('e.attestation_signature_id');
          });
      }),
    scope,
  )
    .orderBy(['p.study_id', 'e.onset_on'])
    .select('e.id', 'e.patient_id', 'p.study_id', 'p.site_id', 'e.onset_on', 'e.term', 'e.grade', 'e.attribution', 'e.serious', db.raw('e.attestation_signature_id is not null as attested'));
  for (const e of events) {
    const where = { patientId: e.patient_id, studyId: e.study_id, eventId: e.id, date: e.onset_on };
    if (e.grade === null || e.attribution === null) {
      add(e.site_id, { ...where, kind: 'event-awaits-assessment', message: eventAwaitsAssessment({ term: e.term, onsetOn: e.onset_on, gradeMissing: e.grade === null, attributionMissing: e.attribution === null }) });
    }
    if (e.serious && !e.attested) add(e.site_id, { ...where, kind: 'serious-event-unattested', message: seriousEventUnattested({ term: e.term, onsetOn: e.onset_on }) });
  }

  const cohorts = await listCohorts(db, trialId);
  const designs = await currentDesigns(db, cohorts.map((c) => c.id));
  const definitions = cohorts.flatMap((c) => {
    const toxicity = designs.get(c.id)?.toxicity;
    return toxicity && designs.get(c.id)?.safetyRule !== 'none' ? [{ cohortId: c.id, ...toxicity }] : [];
  });
  if (definitions.length > 0) {
    const related = RELATED_ATTRIBUTIONS.map(() => '?').join(', ');
    const { rows } = await db.raw<{ rows: WindowRow[] }>(
      `with definitions as (select * from unnest(?::uuid[], ?::int[], ?::int[]) as d(cohort_id, min_grade, window_days))
       select p.id as patient_id, p.study_id, p.site_id, to_char(p.enrolled_on + d.window_days, 'YYYY-MM-DD') as last_day
         from patients p join definitions d on d.cohort_id = p.cohort_id
        where p.enrolled_on + d.window_days between ?::date and ?::date + ?::int
          ${scope === 'all' ? '' : `and p.site_id = any(?::uuid[])`}
          and not exists (select 1 from adverse_events e
                           where e.patient_id = p.id and e.onset_on between p.enrolled_on and p.enrolled_on + d.window_days
                             and e.grade >= d.min_grade and e.attribution in (${related}))
        order by last_day, p.study_id`,
      [
        definitions.map((d) => d.cohortId),
        definitions.map((d) => d.minGrade),
        definitions.map((d) => d.windowDays),
        today,
        today,
        WINDOW_CLOSING_DAYS,
        ...(scope === 'all' ? [] : [scope]),
        ...RELATED_ATTRIBUTIONS,
      ] as Knex.RawBinding[],
    );
    for (const w of rows) add(w.site_id, { kind: 'toxicity-window-closing', message: toxicityWindowClosing(w.last_day, today), date: w.last_day, patientId: w.patient_id, studyId: w.study_id });
  }
  return { sites: [...bySite.values()], today, withinDays: WINDOW_CLOSING_DAYS };
}
