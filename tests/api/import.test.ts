/**
 * CSV import of patients: the template, the dry run's row results, the all-or-nothing commit with
 * one audit row per applied row, enrolment rules on imported rows, and hostile files.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let cora: Session;

const HEADER = 'study_id,site_code,cohort_code,enrolled_on,outcome,best_overall_response,response_assessed_on,evaluable,not_evaluable_reason,correction_reason';
const daysAgo = (days: number) => new Date(Date.now() - days * 86_400_000).toISOString().slice(0, 10);
const csv = (...lines: string[]) => Buffer.from([HEADER, ...lines].join('\n') + '\n');

function upload(session: Session, trialId: string, body: Buffer, options: { dryRun?: boolean; filename?: string; contentType?: string } = {}) {
  return session
    .post(`/api/trials/${trialId}/patients/import${options.dryRun ? '?dryRun=1' : ''}`)
    .attach('file', body, { filename: options.filename ?? 'site.csv', contentType: options.contentType ?? 'text/csv' });
}

const counts = async (trialId: string) => ({
  patients: Number((await stack.db('patients').where({ trial_id: trialId }).count({ c: '*' }))[0].c),
  audit: Number((await stack.db('audit_log').where({ trial_id: trialId, entity_type: 'patient' }).count({ c: '*' }))[0].c),
});

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
  cora = await stack.signIn(DEMO.coordinator);
}, 120_000);
afterAll(async () => stack?.close());

describe('the template', () => {
  it('when the template is downloaded, then it is a CSV with exactly the import columns', async () => {
    const res = await cora.get(`/api/trials/${trial.trialId}/patients/import-template.csv`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.text.trim()).toBe(HEADER);
  });
});

describe('dry run and commit', () => {
  it('when a file mixes new, changed, unchanged and bad rows, then the dry run reports each row and writes nothing', async () => {
    const [existing, same] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SA,
      patients: [{ enrolledOn: daysAgo(100) }, { enrolledOn: daysAgo(99), outcome: 'non_responder', bestOverallResponse: 'SD', responseAssessedOn: daysAgo(40) }],
    });
    const before = await counts(trial.trialId);
    const res = await upload(
      cora,
      trial.trialId,
      csv(
        `SA-501,SA,MAIN,${daysAgo(10)},pending,,,yes,,`,
        `${existing.studyId},SA,MAIN,${daysAgo(100)},responder,PR,${daysAgo(30)},yes,,`,
        `${same.studyId},SA,MAIN,${daysAgo(99)},non_responder,SD,${daysAgo(40)},yes,,`,
        `SA-502,SA,MAIN,${daysAgo(-5)},pending,,,yes,,`,
        `SB-503,SB,MAIN,${daysAgo(5)},pending,,,yes,,`,
      ),
      { dryRun: true },
    );
    expect(res.status).toBe(200);
    expect(res.body.counts).toEqual({ total: 5, new: 1, update: 1, unchanged: 1, error: 2 });
    expect(res.body.rows.map((r: { result: string }) => r.result)).toEqual(['new', 'update', 'unchanged', 'error', 'error']);
    expect(res.body.rows[3].errors).toEqual([{ column: 'enrolled_on', reason: expect.stringMatching(/future/) }]);
    expect(res.body.rows[4].errors).toEqual([{ column: 'site_code', reason: expect.stringMatching(/not one of your sites/) }]);
    expect(res.body.committed).toBe(false);
    expect(await counts(trial.trialId)).toEqual(before);
  });

  it('when a file with one bad row is committed, then 422 with the row results and nothing is written', async () => {
    const before = await counts(trial.trialId);
    const res = await upload(cora, trial.trialId, csv(`SA-601,SA,MAIN,${daysAgo(10)},pending,,,yes,,`, `SA-602,SA,MAIN,${daysAgo(9)},responder,SD,${daysAgo(2)},yes,,`));
    expect(res.status).toBe(422);
    expect(res.body.error.counts).toMatchObject({ new: 1, error: 1 });
    expect(res.body.error.rows[1].errors[0]).toMatchObject({ column: 'best_overall_response' });
    expect(await counts(trial.trialId)).toEqual(before);
  });

  it('when a good file is dry-run and then committed, then the counts match and each applied row leaves one audit row', async () => {
    const [known] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SA,
      patients: [{ enrolledOn: daysAgo(60), outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: daysAgo(20) }],
    });
    const file = csv(
      `SA-701,SA,MAIN,${daysAgo(12)},pending,,,yes,,`,
      `sa-702,sa,main,${daysAgo(11)},responder,CR,${daysAgo(1)},yes,,`,
      `SA-703,SA,,${daysAgo(10)},pending,,,no,"Withdrew, before any scan",`,
      `${known.studyId},SA,MAIN,,non_responder,PD,${daysAgo(15)},yes,,Central review`,
    );
    const dry = await upload(cora, trial.trialId, file, { dryRun: true });
    expect(dry.status).toBe(200);
    const before = await counts(trial.trialId);
    const commit = await upload(cora, trial.trialId, file);
    expect(commit.status).toBe(200);
    expect(commit.body.committed).toBe(true);
    expect(commit.body.counts).toEqual(dry.body.counts);
    expect(commit.body.counts).toEqual({ total: 4, new: 3, update: 1, unchanged: 0, error: 0 });
    expect(await counts(trial.trialId)).toEqual({ patients: before.patients + 3, audit: before.audit + 4 });
    const corrected = await stack.db('audit_log').where({ entity_id: known.id }).orderBy('id', 'desc').first();
    expect(corrected).toMatchObject({ action: 'outcome_corrected', reason: 'Central review' });
    const again = await upload(cora, trial.trialId, file, { dryRun: true });
    expect(again.body.counts).toMatchObject({ unchanged: 4, error: 0 });
  });

  it('when a recorded outcome is changed without a correction reason, then that row is an error in the correction_reason column', async () => {
    const [known] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SA,
      patients: [{ enrolledOn: daysAgo(60), outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: daysAgo(20) }],
    });
    const res = await upload(cora, trial.trialId, csv(`${known.studyId},SA,MAIN,,non_responder,PD,${daysAgo(15)},yes,,`), { dryRun: true });
    expect(res.body.rows[0]).toMatchObject({ result: 'error', errors: [{ column: 'correction_reason' }] });
  });

  it('when imported rows fill stage 1, then the pause applies to the rows after it', async () => {
    const t = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], r1: 0, n1: 2, r: 2, n: 8 });
    const res = await upload(
      cora,
      t.trialId,
      csv(`SA-1,SA,,${daysAgo(3)},pending,,,yes,,`, `SA-2,SA,,${daysAgo(2)},pending,,,yes,,`, `SA-3,SA,,${daysAgo(1)},pending,,,yes,,`),
      { dryRun: true },
    );
    expect(res.body.rows.map((r: { result: string }) => r.result)).toEqual(['new', 'new', 'error']);
    expect(res.body.rows[2].errors[0].reason).toMatch(/^Accrual is paused/);
    expect(res.body.pausedCohorts).toEqual(['MAIN']);
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('enrolling_stage_1');
  });
});

describe('hostile files', () => {
  it('when the file is larger than 1 MB, then 413 with a clear message', async () => {
    const big = Buffer.concat([csv(), Buffer.alloc(1024 * 1024 + 10, 'a')]);
    const res = await upload(cora, trial.trialId, big, { dryRun: true });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/larger than 1 MB/);
  });

  it('when the file is binary or not UTF-8, then 400 naming the problem', async () => {
    const nul = await upload(cora, trial.trialId, Buffer.concat([csv(), Buffer.from([0, 1, 2, 3])]), { dryRun: true });
    expect(nul.status).toBe(400);
    expect(nul.body.error.message).toMatch(/binary/);
    const latin1 = await upload(cora, trial.trialId, Buffer.concat([csv(), Buffer.from([0xe9, 0x0a])]), { dryRun: true });
    expect(latin1.status).toBe(400);
    expect(latin1.body.error.message).toMatch(/UTF-8/);
  });

  it('when the file is not a CSV by name and type, then 400', async () => {
    const res = await upload(cora, trial.trialId, csv(), { dryRun: true, filename: 'site.xlsx', contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/Only CSV files/);
  });

  it('when columns are missing or unknown, then 400 naming them', async () => {
    const res = await upload(cora, trial.trialId, Buffer.from('study_id,site,enrolled_on\nSA-1,SA,2026-01-02\n'), { dryRun: true });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/missing: site_code, cohort_code/);
    expect(res.body.error.message).toMatch(/not recognised: site/);
  });

  it('when there are more than 2,000 rows, then 400', async () => {
    const lines = Array.from({ length: 2001 }, (_, i) => `SA-${9000 + i},SA,MAIN,${daysAgo(3)},pending,,,yes,,`);
    const res = await upload(cora, trial.trialId, csv(...lines), { dryRun: true });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/at most 2000/);
  });

  it('when cells start like formulas, then text cells are stored with a leading quote, fixed-format cells are refused, and the export neutralises again', async () => {
    const refused = await upload(cora, trial.trialId, csv(`=SA-1,SA,MAIN,${daysAgo(3)},pending,,,yes,,`, `SA-801,SA,MAIN,${daysAgo(3)},@SUM(1),,,yes,,`), { dryRun: true });
    expect(refused.body.rows.map((r: { errors: Array<{ column: string }> }) => r.errors[0]?.column)).toEqual(['study_id', 'outcome']);
    expect(refused.body.rows[0].errors[0].reason).toMatch(/formula/);
    const stored = await upload(cora, trial.trialId, csv(`SA-802,SA,MAIN,${daysAgo(3)},pending,,,no,"=HYPERLINK(""http://x"",""click"")",`, `SA-803,SA,MAIN,${daysAgo(3)},pending,,,no,-2+3,`));
    expect(stored.status).toBe(200);
    const reasons = await stack.db('patients').whereIn('study_id', ['SA-802', 'SA-803']).orderBy('study_id').pluck('not_evaluable_reason');
    expect(reasons).toEqual([`'=HYPERLINK("http://x","click")`, `'-2+3`]);
    const exported = await cora.get(`/api/trials/${trial.trialId}/patients/export.csv`);
    expect(exported.status).toBe(200);
    expect(exported.text).toContain(`"'=HYPERLINK(""http://x"",""click"")"`);
    expect(exported.text.split('\r\n').some((line) => /(^|,)[=+\-@]/.test(line))).toBe(false);
  });
});
