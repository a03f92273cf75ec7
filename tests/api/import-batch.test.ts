/**
 * The import enrols a file's new patients together (`enrolPatients`: one look-up, one insert, one
 * audit statement, the accrual rules once per cohort) and writes the changes to known patients
 * together (`writeOutcomes`: one update, one audit statement, one re-derivation). It must decide
 * exactly what applying the rows one after another decides. Random files (two cohorts, two-stage
 * designs with either analysis population and either interim policy, not-evaluable patients, rows
 * of another site, rows before the trial started, rows for patients already there, pending or
 * recorded: outcomes recorded, corrected with or without a reason, evaluability changed, identity
 * refused) are imported once as a whole into one trial and row by row (a one-row file each) into a
 * twin trial; the row results, every patient's stage, enrolment order, outcome and derivation, the
 * cohorts' states, the audit rows and the interim e-mails (their text too) must be the same.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import type { Session } from '../support/sign-in.js';

const HEADER = 'study_id,site_code,cohort_code,enrolled_on,outcome,best_overall_response,response_assessed_on,evaluable,not_evaluable_reason,correction_reason';
const daysAgo = (days: number) => new Date(Date.now() - days * 86_400_000).toISOString().slice(0, 10);

let stack: Stack;
let cora: Session;

beforeAll(async () => {
  stack = await startStack();
  cora = await stack.signIn(DEMO.coordinator);
}, 120_000);
afterAll(async () => stack?.close());

type Row = { number: number; site: 'SA' | 'SB'; cohort: 'A' | 'B'; kind: 'pending' | 'responder' | 'non_responder' | 'not_evaluable' | 'too_early'; reason?: boolean };
type Setting = { population: 'all_enrolled' | 'evaluable'; interim: 'pause' | 'continue_at_risk'; n1: number; preEnrolled: number };

function line(row: Row): string {
  const id = `${row.site}-${row.number}`;
  // Patients already there were enrolled 60 days ago: their row records an outcome for them.
  const enrolled = row.kind === 'too_early' ? '2025-06-01' : row.number >= 900 ? daysAgo(60) : daysAgo(40);
  const assessed = daysAgo(10);
  const cells: Record<Row['kind'], string> = {
    pending: 'pending,,,yes,',
    responder: `responder,PR,${assessed},yes,`,
    non_responder: `non_responder,PD,${assessed},yes,`,
    not_evaluable: `non_responder,NE,${assessed},no,Withdrew before the first scan`,
    too_early: 'pending,,,yes,',
  };
  return `${id},${row.site},${row.cohort},${enrolled},${cells[row.kind]},${row.reason ? 'Scan re-read' : ''}`;
}

const file = (rows: Row[]) => Buffer.from([HEADER, ...rows.map(line)].join('\n') + '\n');

async function twinTrial(setting: Setting) {
  const trial = await createTrial(stack.db, { cohorts: ['A', 'B'] });
  for (const cohortId of trial.cohortIds) {
    await lockDesignDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId,
      r1: 0,
      n1: setting.n1,
      r: 3,
      n: 12,
      analysisPopulation: setting.population,
      interimAccrual: setting.interim,
    });
  }
  // Patients already there: pending, recorded (a change to it is a correction), not evaluable, pending.
  await enrolPatientsDirectly(stack.db, {
    trialId: trial.trialId,
    cohortId: trial.cohortIds[0],
    siteId: trial.siteIds.SA,
    patients: Array.from({ length: setting.preEnrolled }, (_, i) => ({
      studyId: `SA-${900 + i}`,
      enrolledOn: daysAgo(60),
      ...[{}, { outcome: 'responder' as const }, { outcome: 'non_responder' as const, bestOverallResponse: 'NE' as const, evaluable: false }, {}][i],
    })),
  });
  return trial;
}

async function upload(trialId: string, body: Buffer) {
  const response = await cora.post(`/api/trials/${trialId}/patients/import`).attach('file', body, { filename: 'site.csv', contentType: 'text/csv' });
  if (response.status !== 200 && response.status !== 422) throw new Error(`import answered ${response.status}: ${response.text.slice(0, 300)}`);
  return response.body as { rows?: Array<{ result: string; errors: Array<{ column: string; reason: string }> }>; error?: { rows: Array<{ result: string; errors: Array<{ column: string; reason: string }> }> } };
}

async function state(trialId: string) {
  const patients = await stack.db('patients as p')
    .join('cohorts as c', 'c.id', 'p.cohort_id')
    .where('p.trial_id', trialId)
    .orderBy(['c.code', 'p.enrolment_seq'])
    .select('p.study_id', 'c.code', 'p.enrolment_seq', 'p.stage', 'p.outcome', 'p.best_overall_response', 'p.evaluable', 'p.version', 'p.derived_responder', 'p.outcome_flag');
  const cohorts = await stack.db('cohorts').where({ trial_id: trialId }).orderBy('code').select('code', 'status');
  const audit = await stack.db('audit_log').where({ trial_id: trialId }).groupBy('entity_type', 'action').orderBy(['entity_type', 'action']).select('entity_type', 'action').count({ n: '*' });
  // What each patient's audit rows say (no ids: they differ between the twins), in a stable order.
  const patientAudit = (await stack.db('audit_log').where({ trial_id: trialId, entity_type: 'patient' }).select('action', 'before', 'after', 'reason'))
    .map((a: { action: string; before: unknown; after: unknown; reason: string | null }) => JSON.stringify([a.action, a.before, a.after, a.reason]))
    .sort();
  const trial = await stack.db('trials').where({ id: trialId }).first('code');
  const mails = await stack.db('mail_outbox').where('subject', 'like', `${trial.code} %`).orderBy(['subject', 'to_address']).select('subject', 'to_address', 'body_text');
  return {
    patients,
    cohorts,
    audit,
    patientAudit,
    mails: mails.map((m: { subject: string; to_address: string; body_text: string }) => [m.subject.replace(trial.code, 'T'), m.to_address, m.body_text.replaceAll(trial.code, 'T')]),
  };
}

const rowArb = fc.record({
  number: fc.integer({ min: 1, max: 60 }),
  site: fc.constantFrom<Row['site']>('SA', 'SA', 'SA', 'SB'),
  cohort: fc.constantFrom<Row['cohort']>('A', 'A', 'B'),
  kind: fc.constantFrom<Row['kind']>('pending', 'responder', 'non_responder', 'not_evaluable', 'not_evaluable', 'too_early'),
});
const settingArb = fc.record({
  population: fc.constantFrom<Setting['population']>('all_enrolled', 'evaluable'),
  interim: fc.constantFrom<Setting['interim']>('pause', 'continue_at_risk'),
  n1: fc.integer({ min: 2, max: 5 }),
  preEnrolled: fc.integer({ min: 0, max: 4 }),
});
// Rows for the patients already there (SA-900 …), each placed somewhere among the new ones.
const knownArb = fc.uniqueArray(
  fc.record({
    which: fc.integer({ min: 0, max: 3 }),
    kind: fc.constantFrom<Row['kind']>('pending', 'responder', 'non_responder', 'not_evaluable', 'too_early'),
    reason: fc.boolean(),
    at: fc.nat(),
  }),
  { maxLength: 4, selector: (k) => k.which },
);

describe('a file enrols its new patients and changes its known ones together, as one row after another would', () => {
  it('when random files are imported whole into one trial and row by row into its twin, then the results, stages, cohorts, audit rows and mails agree', async () => {
    await fc.assert(
      fc.asyncProperty(settingArb, fc.uniqueArray(rowArb, { minLength: 1, maxLength: 14, selector: (r) => `${r.site}-${r.number}` }), knownArb, async (setting, rows, known) => {
        const withTaken: Row[] = [...rows];
        for (const k of known.filter((k) => k.which < setting.preEnrolled)) {
          withTaken.splice(k.at % (withTaken.length + 1), 0, { number: 900 + k.which, site: 'SA', cohort: 'A', kind: k.kind, reason: k.reason });
        }
        const [whole, oneByOne] = [await twinTrial(setting), await twinTrial(setting)];

        // A file with any bad row commits nothing: compare the dry runs' verdicts first, then commit the good rows.
        const dry = await cora.post(`/api/trials/${whole.trialId}/patients/import?dryRun=1`).attach('file', file(withTaken), { filename: 'site.csv', contentType: 'text/csv' });
        expect(dry.status).toBe(200);
        const singles: Array<{ result: string; errors: Array<{ column: string; reason: string }> }> = [];
        for (const row of withTaken) {
          const body = await upload(oneByOne.trialId, file([row]));
          singles.push((body.rows ?? body.error?.rows ?? [])[0]);
        }
        const verdicts = (list: Array<{ result: string; errors: Array<{ column: string; reason: string }> }>) => list.map((r) => [r.result, r.errors.map((e) => `${e.column}: ${e.reason}`)]);
        expect(verdicts(dry.body.rows)).toEqual(verdicts(singles));

        const good = withTaken.filter((_, i) => dry.body.rows[i].result !== 'error');
        if (good.length > 0) expect((await upload(whole.trialId, file(good))).rows?.every((r) => r.result !== 'error')).toBe(true);
        expect(await state(whole.trialId)).toEqual(await state(oneByOne.trialId));
      }),
      {
        numRuns: 25,
        // Always tried: a cohort already due for its interim review (stage 1 full, as an amendment lowering n1 leaves it) whose two known patients change in one file.
        examples: [
          [
            { population: 'all_enrolled', interim: 'pause', n1: 2, preEnrolled: 2 },
            [{ number: 1, site: 'SA', cohort: 'A', kind: 'pending' }],
            [
              { which: 0, kind: 'responder', reason: false, at: 0 },
              { which: 1, kind: 'pending', reason: true, at: 0 },
            ],
          ],
          // Stage 1 of the evaluable population fills at one known patient's row and empties at the next: the review starts at that row.
          [
            { population: 'evaluable', interim: 'pause', n1: 4, preEnrolled: 4 },
            [{ number: 1, site: 'SA', cohort: 'B', kind: 'pending' }],
            [
              { which: 0, kind: 'responder', reason: false, at: 0 },
              { which: 2, kind: 'responder', reason: true, at: 1 },
              { which: 3, kind: 'not_evaluable', reason: false, at: 2 },
            ],
          ],
          // A patient counted again moves the next one to stage 2 before that one's row: its audit row starts from stage 2.
          [
            { population: 'evaluable', interim: 'pause', n1: 3, preEnrolled: 4 },
            [{ number: 1, site: 'SA', cohort: 'B', kind: 'pending' }],
            [
              { which: 2, kind: 'responder', reason: true, at: 0 },
              { which: 3, kind: 'responder', reason: false, at: 1 },
            ],
          ],
          // After the review starts at the first row, a patient no longer counted moves a later one back to stage 1 within the rows written together: that one's audit row starts and ends in stage 1.
          [
            { population: 'evaluable', interim: 'pause', n1: 2, preEnrolled: 4 },
            [{ number: 1, site: 'SA', cohort: 'B', kind: 'pending' }],
            [
              { which: 0, kind: 'responder', reason: false, at: 0 },
              { which: 1, kind: 'not_evaluable', reason: true, at: 1 },
              { which: 3, kind: 'responder', reason: false, at: 2 },
            ],
          ],
        ],
      },
    );
  }, 240_000);
});
