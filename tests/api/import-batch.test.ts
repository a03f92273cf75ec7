/**
 * The import enrols a file's new patients together (`enrolPatients`): one look-up, one insert, one
 * audit statement, the accrual rules once per cohort. It must decide exactly what enrolling the
 * rows one after another decides. Random files (two cohorts, two-stage designs with either analysis
 * population and either interim policy, not-evaluable patients, rows of another site, rows before
 * the trial started, a row for a patient already there) are imported once as a whole into one trial and row by row
 * (a one-row file each) into a twin trial; the row results, every patient's stage and enrolment
 * order, the cohorts' states, the audit rows and the interim e-mails must be the same.
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

type Row = { number: number; site: 'SA' | 'SB'; cohort: 'A' | 'B'; kind: 'pending' | 'responder' | 'non_responder' | 'not_evaluable' | 'too_early' };
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
  return `${id},${row.site},${row.cohort},${enrolled},${cells[row.kind]},`;
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
  // Patients already there (so a file can also repeat a study ID that is taken).
  await enrolPatientsDirectly(stack.db, {
    trialId: trial.trialId,
    cohortId: trial.cohortIds[0],
    siteId: trial.siteIds.SA,
    patients: Array.from({ length: setting.preEnrolled }, (_, i) => ({ studyId: `SA-${900 + i}`, enrolledOn: daysAgo(60) })),
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
    .select('p.study_id', 'c.code', 'p.enrolment_seq', 'p.stage', 'p.outcome', 'p.evaluable', 'p.derived_responder');
  const cohorts = await stack.db('cohorts').where({ trial_id: trialId }).orderBy('code').select('code', 'status');
  const audit = await stack.db('audit_log').where({ trial_id: trialId }).groupBy('entity_type', 'action').orderBy(['entity_type', 'action']).select('entity_type', 'action').count({ n: '*' });
  const trial = await stack.db('trials').where({ id: trialId }).first('code');
  const mails = await stack.db('mail_outbox').where('subject', 'like', `${trial.code} %`).orderBy(['subject', 'to_address']).select('subject', 'to_address');
  return { patients, cohorts, audit, mails: mails.map((m: { subject: string; to_address: string }) => [m.subject.replace(trial.code, 'T'), m.to_address]) };
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
  preEnrolled: fc.integer({ min: 0, max: 2 }),
});

describe('a file enrols its new patients together, as one enrolment after another would', () => {
  it('when random files are imported whole into one trial and row by row into its twin, then the results, stages, cohorts, audit rows and mails agree', async () => {
    await fc.assert(
      fc.asyncProperty(settingArb, fc.uniqueArray(rowArb, { minLength: 1, maxLength: 14, selector: (r) => `${r.site}-${r.number}` }), async (setting, rows) => {
        // A patient already there, when there are some: a correction row among the new ones.
        const withTaken: Row[] = setting.preEnrolled > 0 ? [...rows, { number: 900, site: 'SA', cohort: 'A', kind: 'responder' }] : rows;
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
      { numRuns: 25 },
    );
  }, 240_000);
});
