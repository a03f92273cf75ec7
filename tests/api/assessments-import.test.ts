/**
 * CSV import of timepoint assessments: dry run and commit, all-or-nothing, unchanged and corrected
 * rows, the file checks, formula-like cells, site scoping, and the derivation after the import
 * (RECIST 1.1, Eisenhauer et al. 2009; 28-day confirmation is common practice).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { daysFromToday, enrolOne, shiftDate } from '../support/assessment-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let cora: Session;
let sam: Session;

const ENROLLED = daysFromToday(-200);
const day = (n: number) => shiftDate(ENROLLED, n);
const HEADER = 'study_id,date,response,notes,correction_reason';

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  [cora, sam] = await Promise.all([stack.signIn(DEMO.coordinator), stack.signIn(DEMO.statistician)]);
}, 120_000);
afterAll(async () => stack?.close());

function upload(session: Session, csv: string, options: { dryRun?: boolean; filename?: string; contentType?: string } = {}) {
  const path = `/api/trials/${trial.trialId}/assessments/import${options.dryRun ? '?dryRun=1' : ''}`;
  return request(stack.url)
    .post(path)
    .set('Cookie', session.cookie)
    .set('Origin', new URL(stack.url).origin)
    .attach('file', Buffer.from(csv), { filename: options.filename ?? 'assessments.csv', contentType: options.contentType ?? 'text/csv' });
}

const countFor = async (patientId: string) => Number((await stack.db('assessments').where({ patient_id: patientId }).count({ n: '*' }))[0].n);

describe('importing assessments from a CSV file', () => {
  it('when a clean file is dry-run, then the report shows what would happen and nothing is written', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const csv = [HEADER, `${patient.studyId},${day(56)},PR,,`, `${patient.studyId},${day(84)},pr,confirmed,`].join('\n');
    const res = await upload(cora, csv, { dryRun: true });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ dryRun: true, committed: false, counts: { total: 2, new: 2, error: 0 }, derivationsChanged: 1 });
    expect(await countFor(patient.id)).toBe(0);
  });

  it('when a clean file is committed, then the assessments are stored and audited and the patient is re-derived', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const csv = [HEADER, `${patient.studyId},${day(84)},PR,,`, `${patient.studyId},${day(56)},PR,"=HYPERLINK(""x"")",`].join('\r\n');
    const res = await upload(cora, csv);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ committed: true, counts: { new: 2 } });
    const row = await stack.db('patients').where({ id: patient.id }).first();
    expect(row).toMatchObject({ derived_best_overall_response: 'PR', derived_responder: true });
    const stored = await stack.db('assessments').where({ patient_id: patient.id }).orderBy('assessed_on');
    expect(stored[0].notes).toBe(`'=HYPERLINK("x")`);
    const audit = await stack.db('audit_log').whereIn('entity_id', stored.map((s) => s.id));
    expect(audit.map((a) => [a.action, a.reason])).toEqual([
      ['created', 'Imported from a CSV file'],
      ['created', 'Imported from a CSV file'],
    ]);

    const again = await upload(cora, csv);
    expect(again.body.counts).toMatchObject({ unchanged: 2, new: 0 });
  });

  it('when a row changes a recorded assessment, then it needs a correction reason and becomes an audited correction', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    await upload(cora, [HEADER, `${patient.studyId},${day(56)},SD,,`].join('\n'));
    const withoutReason = await upload(cora, [HEADER, `${patient.studyId},${day(56)},PR,,`].join('\n'));
    expect(withoutReason.status).toBe(422);
    expect(withoutReason.body.error.rows[0].errors[0]).toMatchObject({ column: 'response', reason: expect.stringContaining('correction_reason') });
    const withReason = await upload(cora, [HEADER, `${patient.studyId},${day(56)},PR,,Central review`].join('\n'));
    expect(withReason.body.counts).toMatchObject({ update: 1 });
    const [assessment] = await stack.db('assessments').where({ patient_id: patient.id });
    expect(assessment).toMatchObject({ response: 'PR', version: 2 });
    expect(await stack.db('audit_log').where({ entity_id: assessment.id, action: 'corrected' }).first()).toMatchObject({ reason: 'Central review' });
  });

  it('when some rows are wrong, then the commit is refused with 422, every bad row is named, and nothing is written', async () => {
    const mine = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const theirs = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, site: 'SB' });
    const csv = [
      HEADER,
      `${mine.studyId},${day(56)},SD,,`,
      `${theirs.studyId},${day(56)},SD,,`,
      `${mine.studyId},${day(-3)},SD,,`,
      `${mine.studyId},${day(70)},XX,,`,
      `${mine.studyId},=1+1,SD,,`,
      `${mine.studyId},${day(56)},PD,,`,
      `NOPE-001,${day(56)},SD,,`,
    ].join('\n');
    const res = await upload(cora, csv);
    expect(res.status).toBe(422);
    const errors = res.body.error.rows.filter((r: { result: string }) => r.result === 'error').map((r: { line: number; errors: Array<{ column: string }> }) => [r.line, r.errors[0].column]);
    expect(errors).toEqual([
      [3, 'study_id'],
      [4, 'date'],
      [5, 'response'],
      [6, 'date'],
      [7, 'date'],
      [8, 'study_id'],
    ]);
    expect(await countFor(mine.id)).toBe(0);
    expect(await countFor(theirs.id)).toBe(0);
  });

  it('when the upload is not the expected CSV, then 400 says why', async () => {
    expect((await upload(cora, 'hello', { filename: 'notes.txt', contentType: 'text/plain' })).status).toBe(400);
    const wrongColumns = await upload(cora, 'patient,when\nX,1');
    expect(wrongColumns.status).toBe(400);
    expect(wrongColumns.body.error.message).toContain('missing: study_id, date, response');
    const noFile = await cora.post(`/api/trials/${trial.trialId}/assessments/import`, {});
    expect(noFile.status).toBe(400);
    const template = await cora.get(`/api/trials/${trial.trialId}/assessments/import-template.csv`);
    expect(template.text).toBe(`${HEADER}\r\n`);
  });

  it('when the statistician uploads, then 403', async () => {
    expect((await upload(sam, `${HEADER}\n`)).status).toBe(403);
  });
});
