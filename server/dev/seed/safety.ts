/**
 * Demo adverse events (invented: terms, grades and dates are fiction) for every cohort whose locked
 * design monitors toxicity — TSY-201 — placed so the cohort stands near its continuous toxicity
 * boundary but not over it: one toxicity short of the boundary at the patients assessable today.
 * Other patients get events that do not count (low grade, unrelated), and the most recent patient
 * has an event awaiting its grade and attribution (so is not assessable yet). The investigator at HCC has
 * attested that site's toxicities. Idempotent: a cohort that already has events is left alone.
 */
import type { Knex } from 'knex';
import { writeAudit } from '../../audit/audit.js';
import { recordSignature } from '../../signatures/signatures.js';
import { currentDesign } from '../../designs/index.js';
import { demoSigningSession } from './signing.js';
import { ruleOfDesign, safetyCounts, safetyRuleState } from '../../safety/index.js';

const DAY = 86_400_000;
const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** Events that meet a grade-3 definition (term, grade, attribution). */
const TOXIC = [
  ['Neutropenia', 3, 'probable'],
  ['Febrile neutropenia', 3, 'possible'],
  ['Alanine aminotransferase increased', 3, 'probable'],
  ['Diarrhoea', 3, 'definite'],
  ['Platelet count decreased', 4, 'probable'],
  ['Mucositis oral', 3, 'possible'],
] as const;
/** Events that do not: too mild, or not related to the agent. */
const OTHER = [
  ['Fatigue', 1, 'possible'],
  ['Nausea', 2, 'probable'],
  ['Rash maculo-papular', 1, 'possible'],
  ['Fall', 3, 'unrelated'],
  ['Hypertension', 2, 'unlikely'],
] as const;

type NewEvent = { patientId: string; studyId: string; site: string; onsetOn: string; term: string; grade: number | null; attribution: string | null; serious: boolean; outcome: string };

export async function seedSafety(trx: Knex.Transaction, trials: Map<string, string>, today: Date): Promise<void> {
  const todayMs = Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate());
  const todayIso = iso(todayMs);
  const people = new Map<string, { id: string; email: string }>(
    (await trx('users').whereIn('email', ['cora.coord@tessaly.test', 'ivan.inv@tessaly.test']).select('id', 'email')).map((u) => [u.email, u]),
  );
  const enteredBy = (site: string) => (site === 'RVG' ? people.get('cora.coord@tessaly.test') : site === 'HCC' ? people.get('ivan.inv@tessaly.test') : undefined);
  for (const trialId of trials.values()) {
    for (const cohort of await trx('cohorts').where({ trial_id: trialId }).select('id', 'code')) {
      const design = await currentDesign(trx, cohort.id);
      const rule = ruleOfDesign(design);
      if (!design?.toxicity || rule?.rule !== 'toxicity_boundary') continue;
      if (await trx('adverse_events as e').join('patients as p', 'p.id', 'e.patient_id').where('p.cohort_id', cohort.id).first('e.id')) continue;
      const { windowDays } = design.toxicity;
      const patients: Array<{ id: string; study_id: string; enrolled_on: string; site: string }> = await trx('patients as p')
        .join('sites as s', 's.id', 'p.site_id')
        .where('p.cohort_id', cohort.id)
        .orderBy('p.enrolment_seq')
        .select('p.id', 'p.study_id', 'p.enrolled_on', 's.code as site');
      const enrolledMs = (p: { enrolled_on: string }) => Date.parse(`${p.enrolled_on}T00:00:00Z`);
      const windowClosed = patients.filter((p) => enrolledMs(p) + windowDays * DAY < todayMs);
      // The patient whose event awaits its grade: not assessable, whether the window is open or not.
      const waiting = patients.find((p) => !windowClosed.includes(p)) ?? windowClosed[windowClosed.length - 1];
      const closed = windowClosed.filter((p) => p !== waiting);
      const k = Math.min(closed.length, rule.bounds.length);
      const bound = k > 0 ? rule.bounds[k - 1] : null;
      // One toxicity short of the boundary at the patients assessable today.
      const toxicCount = bound === null ? 0 : bound - 1;
      const toxic = [...closed.filter((_, i) => i % 2 === 1), ...closed.filter((_, i) => i % 2 === 0)].slice(0, toxicCount);
      const events: NewEvent[] = [];
      toxic.forEach((p, i) => {
        const [term, grade, attribution] = TOXIC[i % TOXIC.length];
        events.push({ patientId: p.id, studyId: p.study_id, site: p.site, onsetOn: iso(enrolledMs(p) + (6 + ((i * 5) % 18)) * DAY), term, grade, attribution, serious: grade >= 4, outcome: i % 3 === 2 ? 'recovered_with_sequelae' : 'recovered' });
      });
      closed
        .filter((p) => !toxic.includes(p))
        .forEach((p, i) => {
          if (i % 2 === 1) return;
          const [term, grade, attribution] = OTHER[i % OTHER.length];
          events.push({ patientId: p.id, studyId: p.study_id, site: p.site, onsetOn: iso(enrolledMs(p) + (3 + ((i * 7) % 20)) * DAY), term, grade, attribution, serious: false, outcome: 'recovered' });
        });
      if (waiting) {
        const onset = Math.min(enrolledMs(waiting) + 4 * DAY, todayMs);
        events.push({ patientId: waiting.id, studyId: waiting.study_id, site: waiting.site, onsetOn: iso(onset), term: 'Blood creatinine increased', grade: null, attribution: null, serious: false, outcome: 'recovering' });
      }
      for (const event of events) await insertDemoEvent(trx, trialId, event, enteredBy(event.site), people.get('ivan.inv@tessaly.test'), today, toxic.some((p) => p.id === event.patientId));
      const counts = (await safetyCounts(trx, [{ cohortId: cohort.id, ...design.toxicity }], todayIso)).get(cohort.id);
      if (counts && safetyRuleState(rule, counts).crossed) throw new Error(`The demo events of cohort ${cohort.code} would cross its toxicity boundary.`);
    }
  }
}

async function insertDemoEvent(
  trx: Knex.Transaction,
  trialId: string,
  event: NewEvent,
  author: { id: string } | undefined,
  investigator: { id: string; email: string } | undefined,
  today: Date,
  toxic: boolean,
): Promise<void> {
  const [row] = await trx('adverse_events')
    .insert({
      trial_id: trialId,
      patient_id: event.patientId,
      onset_on: event.onsetOn,
      term: event.term,
      grade: event.grade,
      attribution: event.attribution,
      serious: event.serious,
      outcome: event.outcome,
      created_by: author?.id ?? null,
    })
    .returning('id');
  const snapshot = { studyId: event.studyId, onsetOn: event.onsetOn, term: event.term, grade: event.grade, attribution: event.attribution, serious: event.serious, outcome: event.outcome };
  await writeAudit(trx, { actorUserId: author?.id ?? null, trialId, entityType: 'adverse_event', entityId: row.id, action: 'created', after: snapshot, reason: 'Demo data' });
  if (!toxic || event.site !== 'HCC' || !investigator) return;
  const signedAt = new Date(Math.min(Date.parse(`${event.onsetOn}T16:00:00Z`) + 14 * DAY, today.getTime()));
  const intent = { action: 'attestation' as const, subjectId: row.id };
  const signature = await recordSignature(trx, {
    trialId,
    signer: investigator,
    session: await demoSigningSession(trx, investigator.id, intent, signedAt),
    intent,
    meaning: `I attest that the adverse event "${event.term}" with onset on ${event.onsetOn} recorded for ${event.studyId} is accurate and complete`,
    subjectType: 'attestation',
    subjectId: row.id,
    content: { adverseEventId: row.id, patientId: event.patientId, version: 1, ...snapshot, notes: null },
  });
  await trx('adverse_events').where({ id: row.id }).update({ attestation_signature_id: signature.id, version: 2 });
  await writeAudit(trx, { actorUserId: investigator.id, trialId, entityType: 'adverse_event', entityId: row.id, action: 'attested', after: { ...snapshot, attestationSignatureId: signature.id } });
}
