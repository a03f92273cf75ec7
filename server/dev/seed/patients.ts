/**
 * Demo patients that make the demo scenario true, read against the designs the design
 * seed locked: TSY-201 in stage 2 with patients at all four sites (stage 1 passed, a few outcomes
 * pending), TSY-202 with its stage-1 cohort complete and accrual paused, TSY-203 stopped for
 * futility after stage 1, TSY-204's three cohorts enrolling. Dates spread over the trials' lives
 * (the last 18 months), none in the future. Deterministic (a seeded sequence) and idempotent: a
 * cohort that already has patients, or has no locked design, is left alone. Invented data only.
 */
import type { Knex } from 'knex';
import { writeAudit } from '../../audit/audit.js';
import { recordSignature } from '../../signatures/signatures.js';
import { attestationMeaning } from '../../patients/index.js';
import { demoSigningSession } from './signing.js';
import { currentDesign } from '../../designs/index.js';
import { assignStages, type Outcome } from '../../evaluation/index.js';

/** R responder, N non-responder, P pending, E not evaluable (no post-baseline assessment). */
type Plan = { trial: string; cohort: string; outcomes: (n1: number, r1: number) => string };

const PLANS: Plan[] = [
  // Stage 1 (13 patients) with 5 responders passes r1 = 3; stage 2 under way, last outcomes pending.
  { trial: 'TSY-201', cohort: 'MAIN', outcomes: (n1) => 'RNNRNRNNRNRNN'.padEnd(n1, 'N').slice(0, n1) + 'NRNNRNNPPP' },
  // Stage 1 complete (n1 evaluable patients, one more enrolled who is not evaluable), two outcomes still pending.
  { trial: 'TSY-202', cohort: 'MAIN', outcomes: (n1) => ('NNRNENNNNRNNNNPP'.padEnd(n1 + 1, 'N')).slice(0, n1 + 1) },
  // Stage 1 complete with r1 or fewer responders: stopped for futility.
  { trial: 'TSY-203', cohort: 'MAIN', outcomes: (n1, r1) => Array.from({ length: n1 }, (_, i) => (i % 4 === 2 && Math.floor(i / 4) < r1 ? 'R' : 'N')).join('') },
  { trial: 'TSY-204', cohort: 'NSCLC', outcomes: (n1) => 'NRNNPNRP'.slice(0, Math.max(1, n1 - 2)) },
  { trial: 'TSY-204', cohort: 'CRC', outcomes: (n1) => 'NNENP'.slice(0, Math.max(1, n1 - 2)) },
  { trial: 'TSY-204', cohort: 'THY', outcomes: (n1) => 'RNNRNPP'.slice(0, Math.max(1, n1 - 2)) },
];

const SITES = ['RVG', 'HCC', 'LUH', 'NGC'];
const DAY = 86_400_000;
const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** A small linear congruential sequence: the same demo on every run. */
function sequence(seedText: string) {
  let state = [...seedText].reduce((h, c) => (h * 31 + c.charCodeAt(0)) >>> 0, 7);
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
}

export async function seedPatients(trx: Knex.Transaction, trials: Map<string, string>, today: Date): Promise<void> {
  const sites = new Map<string, string>((await trx('sites').whereIn('code', SITES).select('code', 'id')).map((s) => [s.code, s.id]));
  const people = new Map<string, { id: string; email: string }>(
    (await trx('users').whereIn('email', ['cora.coord@tessaly.test', 'ivan.inv@tessaly.test']).select('id', 'email')).map((u) => [u.email, u]),
  );
  const enteredBy = (site: string) => (site === 'RVG' ? people.get('cora.coord@tessaly.test') : site === 'HCC' ? people.get('ivan.inv@tessaly.test') : undefined);
  const todayMs = Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate());

  for (const plan of PLANS) {
    const trialId = trials.get(plan.trial);
    if (!trialId) continue;
    const trial = await trx('trials').where({ id: trialId }).first('start_date');
    const cohort = await trx('cohorts').where({ trial_id: trialId, code: plan.cohort }).first('id');
    if (!cohort) continue;
    const design = await currentDesign(trx, cohort.id);
    if (!design || design.n1 === null || design.r1 === null) continue;
    if (await trx('patients').where({ cohort_id: cohort.id }).first('id')) continue;

    const next = sequence(`${plan.trial}/${plan.cohort}`);
    const letters = plan.outcomes(design.n1, design.r1).split('');
    const startMs = Math.max(Date.parse(`${trial.start_date}T00:00:00Z`) + 10 * DAY, todayMs - 540 * DAY);
    // Decided outcomes need time for a response assessment; pending ones are the recent enrolments.
    const endMs = todayMs - 14 * DAY;
    const step = (endMs - startMs) / Math.max(1, letters.length);
    const existingAtSite = new Map<string, number>();
    for (const row of await trx('patients').where({ trial_id: trialId }).select('study_id')) {
      const [code] = String(row.study_id).split('-');
      existingAtSite.set(code, (existingAtSite.get(code) ?? 0) + 1);
    }

    const rows = letters.map((letter, index) => {
      const site = plan.trial === 'TSY-201' ? SITES[index % SITES.length] : SITES[Math.floor(next() * SITES.length)];
      const number = (existingAtSite.get(site) ?? 0) + 1;
      existingAtSite.set(site, number);
      const enrolledMs = startMs + Math.floor(index * step + next() * step * 0.6);
      const assessedMs = Math.min(enrolledMs + (42 + Math.floor(next() * 35)) * DAY, todayMs - DAY);
      const outcome: Outcome = letter === 'R' ? 'responder' : letter === 'N' || letter === 'E' ? 'non_responder' : 'pending';
      const bor = letter === 'R' ? (next() < 0.25 ? 'CR' : 'PR') : letter === 'N' ? (next() < 0.5 ? 'SD' : 'PD') : letter === 'E' ? 'NE' : null;
      return {
        site,
        trial_id: trialId,
        cohort_id: cohort.id,
        site_id: sites.get(site) as string,
        study_id: `${site}-${String(number).padStart(3, '0')}`,
        enrolled_on: iso(enrolledMs),
        enrolment_seq: index + 1,
        outcome,
        best_overall_response: bor,
        response_assessed_on: outcome === 'pending' ? null : iso(assessedMs),
        evaluable: letter !== 'E',
        not_evaluable_reason: letter === 'E' ? 'No post-baseline tumour assessment (withdrew after the first cycle)' : null,
      };
    });
    const stages = assignStages(
      rows.map((r) => ({ id: String(r.enrolment_seq), enrolmentSeq: r.enrolment_seq, outcome: r.outcome, evaluable: r.evaluable })),
      design.n1,
      design.analysisPopulation,
    );
    const ids = new Map<number, string>();
    for (const row of rows) {
      const { site, ...values } = row;
      const author = enteredBy(site);
      const [inserted] = await trx('patients')
        .insert({ ...values, stage: stages.get(String(row.enrolment_seq)) ?? 1, created_by: author?.id ?? null })
        .returning('id');
      ids.set(row.enrolment_seq, inserted.id);
      await writeAudit(trx, {
        actorUserId: author?.id ?? null,
        trialId,
        entityType: 'patient',
        entityId: inserted.id,
        action: 'enrolled',
        after: { studyId: row.study_id, siteCode: site, cohortCode: plan.cohort, enrolledOn: row.enrolled_on, outcome: row.outcome, bestOverallResponse: row.best_overall_response },
        reason: 'Demo data',
      });
    }

    // The investigator at HCC has attested the decided stage-1 outcomes of their site.
    const investigator = people.get('ivan.inv@tessaly.test');
    if (!investigator) continue;
    for (const row of rows.filter((r) => r.site === 'HCC' && r.outcome !== 'pending' && stages.get(String(r.enrolment_seq)) === 1)) {
      const patientId = ids.get(row.enrolment_seq) as string;
      const content = {
        patientId,
        studyId: row.study_id,
        version: 1,
        outcome: row.outcome,
        bestOverallResponse: row.best_overall_response,
        responseAssessedOn: row.response_assessed_on,
        evaluable: row.evaluable,
        notEvaluableReason: row.not_evaluable_reason,
      };
      const signedAt = new Date(Date.parse(`${row.response_assessed_on}T16:00:00Z`) + DAY);
      const intent = { action: 'attestation' as const, subjectId: patientId };
      const signature = await recordSignature(trx, {
        trialId,
        signer: investigator,
        session: await demoSigningSession(trx, investigator.id, intent, signedAt > today ? today : signedAt),
        intent,
        meaning: attestationMeaning(row.study_id),
        subjectType: 'attestation',
        subjectId: patientId,
        content,
      });
      await trx('patients').where({ id: patientId }).update({ attestation_signature_id: signature.id, version: 2 });
      await writeAudit(trx, {
        actorUserId: investigator.id,
        trialId,
        entityType: 'patient',
        entityId: patientId,
        action: 'outcome_attested',
        after: { studyId: row.study_id, attestationSignatureId: signature.id },
      });
    }
  }
}
