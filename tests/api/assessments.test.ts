/**
 * Timepoint assessments over HTTP: entry, validation, corrections, site scoping, and the derived
 * best overall response applied to the outcome (derived protocols) or flagged when it disagrees
 * with the entered outcome (entered protocols). Derivation rules: RECIST 1.1 (Eisenhauer et al.
 * 2009, Eur J Cancer 45:228–247); the 28-day confirmation interval is common practice.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { addAssessmentsDirectly, daysFromToday, enrolOne, setOutcomeSettings, shiftDate } from '../support/assessment-factories.js';
import type { Session } from '../support/sign-in.js';
import { recomputeDerivation, recomputeDerivationsForTrial } from '../../server/assessments/assessments.service.js';

let stack: Stack;
let trial: TrialFixture;
let cora: Session; // coordinator at SA
let ivan: Session; // investigator at SB
let sam: Session; // statistician
let mona: Session; // monitor
let ada: Session; // admin
let spencer: Session; // sponsor

const ENROLLED = daysFromToday(-200);
const day = (n: number) => shiftDate(ENROLLED, n);
const url = (patientId: string, assessmentId?: string) =>
  `/api/trials/${trial.trialId}/patients/${patientId}/assessments${assessmentId ? `/${assessmentId}` : ''}`;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  [cora, ivan, sam, mona, ada, spencer] = await Promise.all(
    [DEMO.coordinator, DEMO.investigator, DEMO.statistician, DEMO.monitor, DEMO.admin, DEMO.sponsor].map((email) => stack.signIn(email)),
  );
}, 120_000);
afterAll(async () => stack?.close());

const auditRows = (entityId: string) => stack.db('audit_log').where({ entity_id: entityId }).orderBy('id');

describe('recording assessments', () => {
  it('when a coordinator adds an assessment at their site, then it is stored, audited and the derivation comes back', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const res = await cora.post(url(patient.id), { date: day(56), response: 'PR', notes: 'Target lesions down 40%' });
    expect(res.status).toBe(201);
    expect(res.body.assessment).toMatchObject({ date: day(56), response: 'PR', notes: 'Target lesions down 40%', version: 1 });
    expect(res.body.derivation.pendingConfirmation).toHaveLength(1);
    expect(res.body.derivation.needed[0]).toMatch(/^PR on .+ needs a confirming assessment on or after .+\.$/);
    expect(res.body.patient).toMatchObject({ derivedBestOverallResponse: 'SD', derivedResponder: null, outcome: 'pending' });
    const audit = await auditRows(res.body.assessment.id);
    expect(audit.map((a) => a.action)).toEqual(['created']);
    expect(audit[0].trial_id).toBe(trial.trialId);

    const list = await sam.get(url(patient.id));
    expect(list.status).toBe(200);
    expect(list.body.assessments.map((a: { response: string }) => a.response)).toEqual(['PR']);
    expect(list.body.settings).toMatchObject({ confirmationRequired: true, confirmationMinDays: 28 });
  });

  it('when the date is before enrolment, in the future or not a date, then 400 names the date field and nothing is written', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const before = await cora.post(url(patient.id), { date: day(-1), response: 'SD' });
    expect(before.status).toBe(400);
    expect(before.body.error.fields.date).toContain('before enrolment');
    const future = await cora.post(url(patient.id), { date: daysFromToday(3), response: 'SD' });
    expect(future.status).toBe(400);
    expect(future.body.error.fields.date).toContain('future');
    const notADate = await cora.post(url(patient.id), { date: '2026-02-30', response: 'SD' });
    expect(notADate.body.error.fields.date).toBe('This is not a real calendar date.');
    const badResponse = await cora.post(url(patient.id), { date: day(56), response: 'MR', notes: 'x'.repeat(2001) });
    expect(badResponse.status).toBe(400);
    expect(Object.keys(badResponse.body.error.fields).sort()).toEqual(['notes', 'response']);
    expect(await stack.db('assessments').where({ patient_id: patient.id }).count({ n: '*' })).toEqual([{ n: 0 }]);
  });

  it('when a second assessment has the same date, then 409 and the first one is returned', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    expect((await cora.post(url(patient.id), { date: day(56), response: 'SD' })).status).toBe(201);
    const again = await cora.post(url(patient.id), { date: day(56), response: 'PR' });
    expect(again.status).toBe(409);
    expect(again.body.error.current).toMatchObject({ date: day(56), response: 'SD' });
    expect(again.body.error.fields.date).toBeDefined();
  });
});

describe('corrections', () => {
  it('when an assessment is corrected with a reason, then the version moves on, the audit row keeps before, after and reason', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const created = (await cora.post(url(patient.id), { date: day(56), response: 'SD' })).body.assessment;
    const noReason = await cora.patch(url(patient.id, created.id), { response: 'PR', version: 1 });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toBeDefined();

    const corrected = await cora.patch(url(patient.id, created.id), { response: 'PR', version: 1, reason: 'Radiology report re-read' });
    expect(corrected.status).toBe(200);
    expect(corrected.body.assessment).toMatchObject({ response: 'PR', version: 2 });
    const audit = await auditRows(created.id);
    expect(audit.map((a) => a.action)).toEqual(['created', 'corrected']);
    expect(audit[1]).toMatchObject({ reason: 'Radiology report re-read', before: expect.objectContaining({ response: 'SD' }), after: expect.objectContaining({ response: 'PR' }) });

    const stale = await cora.patch(url(patient.id, created.id), { response: 'CR', version: 1, reason: 'Late edit' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ response: 'PR', version: 2 });
  });

  it('when a correction moves the date onto another assessment, then 409', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    await cora.post(url(patient.id), { date: day(56), response: 'SD' });
    const second = (await cora.post(url(patient.id), { date: day(112), response: 'SD' })).body.assessment;
    const clash = await cora.patch(url(patient.id, second.id), { date: day(56), version: 1, reason: 'Wrong date typed' });
    expect(clash.status).toBe(409);
  });

  it('when an assessment is removed with a reason, then it is gone, audited, and the derivation follows', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const created = (await cora.post(url(patient.id), { date: day(56), response: 'SD' })).body.assessment;
    expect((await cora.delete(url(patient.id, created.id))).status).toBe(400);
    const removed = await cora.delete(url(patient.id, created.id)).send({ version: 1, reason: 'Entered for the wrong patient' });
    expect(removed.status).toBe(200);
    expect(removed.body.assessments).toEqual([]);
    expect(removed.body.patient.derivedBestOverallResponse).toBeNull();
    const audit = await auditRows(created.id);
    expect(audit.map((a) => [a.action, a.reason])).toEqual([
      ['created', null],
      ['removed', 'Entered for the wrong patient'],
    ]);
  });
});

describe('who may see and write assessments', () => {
  it('when a coordinator or investigator reaches a patient at another site, then every assessment route answers 404', async () => {
    const atSb = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, site: 'SB' });
    const [assessmentId] = await addAssessmentsDirectly(stack.db, { trialId: trial.trialId, patientId: atSb.id, assessments: [{ date: day(56), response: 'SD' }] });
    expect((await cora.get(url(atSb.id))).status).toBe(404);
    expect((await cora.post(url(atSb.id), { date: day(60), response: 'SD' })).status).toBe(404);
    expect((await cora.patch(url(atSb.id, assessmentId), { response: 'PR', version: 1, reason: 'x' })).status).toBe(404);
    expect((await cora.delete(url(atSb.id, assessmentId)).send({ version: 1, reason: 'x' })).status).toBe(404);
    expect((await ivan.get(url(atSb.id))).status).toBe(200);

    const atSa = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, site: 'SA' });
    expect((await ivan.get(url(atSa.id))).status).toBe(404);
    expect((await ivan.post(url(atSa.id), { date: day(60), response: 'SD' })).status).toBe(404);
    expect(await stack.db('assessments').whereIn('patient_id', [atSa.id, atSb.id]).count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('when the statistician or the monitor reads, then every site is visible; they cannot write; admin and sponsor get 403', async () => {
    const atSb = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, site: 'SB' });
    expect((await sam.get(url(atSb.id))).status).toBe(200);
    expect((await mona.get(url(atSb.id))).status).toBe(200);
    expect((await sam.post(url(atSb.id), { date: day(56), response: 'SD' })).status).toBe(403);
    expect((await mona.post(url(atSb.id), { date: day(56), response: 'SD' })).status).toBe(403);
    expect((await ada.get(url(atSb.id))).status).toBe(403);
    expect((await spencer.get(url(atSb.id))).status).toBe(403);
    expect((await ada.get(`/api/trials/${trial.trialId}/needs-attention`)).status).toBe(403);
  });

  it('when a patient id belongs to another trial, then 404', async () => {
    const other = await createTrial(stack.db);
    const elsewhere = await enrolOne(stack.db, other, { enrolledOn: ENROLLED });
    expect((await cora.get(url(elsewhere.id))).status).toBe(404);
    expect((await sam.get(url(elsewhere.id))).status).toBe(404);
  });
});

describe('entered outcomes against the derivation', () => {
  it('when the entered outcome disagrees with the derivation, then it is flagged, audited, listed as needing attention, and cleared when they agree', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: day(56) });
    await cora.post(url(patient.id), { date: day(56), response: 'PR' });
    const sd = (await cora.post(url(patient.id), { date: day(112), response: 'SD' })).body;
    expect(sd.patient).toMatchObject({ outcome: 'responder', bestOverallResponse: 'PR', derivedBestOverallResponse: 'SD', derivedResponder: false, outcomeFlag: 'disagrees_with_derivation' });
    const flagged = await stack.db('audit_log').where({ entity_id: patient.id, action: 'flagged' });
    expect(flagged).toHaveLength(1);
    expect(flagged[0].after).toMatchObject({ outcomeFlag: 'disagrees_with_derivation', entered: { outcome: 'responder', bestOverallResponse: 'PR' } });

    const attention = await sam.get(`/api/trials/${trial.trialId}/needs-attention`);
    const sa = attention.body.sites.find((s: { siteCode: string }) => s.siteCode === 'SA');
    expect(sa.items).toContainEqual(expect.objectContaining({ kind: 'entered-disagrees', patientId: patient.id, studyId: patient.studyId }));

    const sdId = sd.assessment.id;
    const agreed = await cora.patch(url(patient.id, sdId), { response: 'PR', version: 1, reason: 'Second read: partial response' });
    expect(agreed.body.patient).toMatchObject({ outcome: 'responder', derivedBestOverallResponse: 'PR', derivedResponder: true, outcomeFlag: null });
    expect(await stack.db('audit_log').where({ entity_id: patient.id, action: 'flag_cleared' })).toHaveLength(1);
    const row = await stack.db('patients').where({ id: patient.id }).first();
    expect(row).toMatchObject({ outcome: 'responder', best_overall_response: 'PR', version: 1 });
  });
});

describe('outcomes entered through the patient record', () => {
  it('when an entered outcome disagrees with the assessments, then the patient record carries the flag and the derivation', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    await cora.post(url(patient.id), { date: day(56), response: 'PR' });
    await cora.post(url(patient.id), { date: day(112), response: 'SD' });
    const entered = await cora.patch(`/api/trials/${trial.trialId}/patients/${patient.id}`, {
      version: 1,
      outcome: 'responder',
      bestOverallResponse: 'PR',
      responseAssessedOn: day(56),
      evaluable: true,
      notEvaluableReason: null,
    });
    expect(entered.status).toBe(200);
    const record = await sam.get(`/api/trials/${trial.trialId}/patients/${patient.id}`);
    expect(record.body.patient).toMatchObject({
      outcome: 'responder',
      derivedBestOverallResponse: 'SD',
      derivedResponder: false,
      outcomeFlag: 'disagrees_with_derivation',
      derivation: expect.objectContaining({ bestOverallResponse: 'SD', explanation: expect.any(Array) }),
    });
    // The patient page lists the derived figures and the flag, and leaves the reasoning to the patient's own record.
    const listed = (await sam.get(`/api/trials/${trial.trialId}/patients?pageSize=100`)).body.patients.find((p: { id: string }) => p.id === patient.id);
    expect(listed).toMatchObject({ derivedBestOverallResponse: 'SD', derivedResponder: false, outcomeFlag: 'disagrees_with_derivation' });
    expect(listed).not.toHaveProperty('derivation');
    expect(await stack.db('audit_log').where({ entity_id: patient.id, action: 'flagged' })).toHaveLength(1);
  });
});

describe('derived outcomes', () => {
  let derivedTrial: TrialFixture;
  beforeAll(async () => {
    derivedTrial = await createTrial(stack.db);
    await setOutcomeSettings(stack.db, derivedTrial.trialId, { outcomeSource: 'derived' });
  });
  const durl = (patientId: string, assessmentId?: string) =>
    `/api/trials/${derivedTrial.trialId}/patients/${patientId}/assessments${assessmentId ? `/${assessmentId}` : ''}`;

  it('when the protocol derives outcomes, then a confirmed PR makes the patient a responder, versioned and audited', async () => {
    const patient = await enrolOne(stack.db, derivedTrial, { enrolledOn: ENROLLED });
    const first = await cora.post(durl(patient.id), { date: day(56), response: 'PR' });
    expect(first.body.patient).toMatchObject({ outcome: 'pending', bestOverallResponse: null, version: 1 });
    const second = await cora.post(durl(patient.id), { date: day(84), response: 'PR' });
    expect(second.body.patient).toMatchObject({ outcome: 'responder', bestOverallResponse: 'PR', derivedResponder: true, version: 2, outcomeFlag: null });
    const row = await stack.db('patients').where({ id: patient.id }).first();
    expect(row.response_assessed_on).toBe(day(56));
    const derived = await stack.db('audit_log').where({ entity_id: patient.id, action: 'outcome_derived' });
    expect(derived).toHaveLength(1);
    expect(derived[0]).toMatchObject({ before: { outcome: 'pending' }, after: { outcome: 'responder', bestOverallResponse: 'PR' } });
    expect(row.derivation.explanation.join(' ')).toContain('confirmed by the PR');
  });

  it('when progression comes first, then the derived outcome is a non-responder with PD', async () => {
    const patient = await enrolOne(stack.db, derivedTrial, { enrolledOn: ENROLLED });
    const res = await cora.post(durl(patient.id), { date: day(50), response: 'PD' });
    expect(res.body.patient).toMatchObject({ outcome: 'non_responder', bestOverallResponse: 'PD' });
  });

  it('when the settings change, then recomputing the trial applies them to every patient', async () => {
    const settingsTrial = await createTrial(stack.db);
    const patient = await enrolOne(stack.db, settingsTrial, { enrolledOn: ENROLLED, outcome: 'non_responder', bestOverallResponse: 'SD', responseAssessedOn: day(56) });
    await addAssessmentsDirectly(stack.db, { trialId: settingsTrial.trialId, patientId: patient.id, assessments: [{ date: day(56), response: 'PR' }, { date: day(112), response: 'SD' }] });
    await stack.db.transaction((trx) => recomputeDerivationsForTrial(trx, settingsTrial.trialId));
    expect(await stack.db('patients').where({ id: patient.id }).first()).toMatchObject({ derived_best_overall_response: 'SD', outcome_flag: null });

    const withoutAssessments = await enrolOne(stack.db, settingsTrial, { enrolledOn: ENROLLED, outcome: 'responder', bestOverallResponse: 'CR', responseAssessedOn: day(60) });
    await setOutcomeSettings(stack.db, settingsTrial.trialId, { outcomeSource: 'derived', confirmationRequired: false });
    expect(await stack.db.transaction((trx) => recomputeDerivationsForTrial(trx, settingsTrial.trialId))).toBe(2);
    expect(await stack.db('patients').where({ id: patient.id }).first()).toMatchObject({ outcome: 'responder', best_overall_response: 'PR', derived_responder: true });
    expect(await stack.db('patients').where({ id: withoutAssessments.id }).first()).toMatchObject({ outcome: 'responder', best_overall_response: 'CR', version: 1 });
  });

  it('when the statistician switches the protocol to derived outcomes, then the same request re-derives every patient', async () => {
    const switched = await createTrial(stack.db);
    const patient = await enrolOne(stack.db, switched, { enrolledOn: ENROLLED });
    await addAssessmentsDirectly(stack.db, { trialId: switched.trialId, patientId: patient.id, assessments: [{ date: day(56), response: 'PR' }, { date: day(112), response: 'PR' }] });
    const response = await sam.patch(`/api/trials/${switched.trialId}/protocol-settings`, {
      version: 1,
      outcomeSource: 'derived',
      confirmationRequired: true,
      confirmationMinDays: 28,
      sdMinDays: 42,
      neBetweenResponses: 'ignore',
      assessmentIntervalDays: 56,
      inactivityWarningWeeks: 6,
      reason: 'Protocol amendment: outcomes follow the assessments',
    });
    expect(response.status).toBe(200);
    expect(await stack.db('patients').where({ id: patient.id }).first()).toMatchObject({
      outcome: 'responder',
      best_overall_response: 'PR',
      derived_best_overall_response: 'PR',
    });
  });

  it('when the last assessment of a derived outcome is removed, then the outcome returns to pending', async () => {
    const patient = await enrolOne(stack.db, derivedTrial, { enrolledOn: ENROLLED });
    const pd = (await cora.post(durl(patient.id), { date: day(50), response: 'PD' })).body.assessment;
    const removed = await cora.delete(durl(patient.id, pd.id)).send({ version: 1, reason: 'Scan belonged to another patient' });
    expect(removed.body.patient).toMatchObject({ outcome: 'pending', bestOverallResponse: null, derivedBestOverallResponse: null, version: 3 });
  });
});

describe('needs attention', () => {
  it('when responses wait past their window, assessments predate enrolment or scans are late, then each site lists them and site roles see only theirs', async () => {
    const attentionTrial = await createTrial(stack.db);
    const aurl = `/api/trials/${attentionTrial.trialId}/needs-attention`;
    const lonePr = await enrolOne(stack.db, attentionTrial, { enrolledOn: ENROLLED, site: 'SA' });
    await addAssessmentsDirectly(stack.db, { trialId: attentionTrial.trialId, patientId: lonePr.id, assessments: [{ date: day(56), response: 'PR' }] });
    const early = await enrolOne(stack.db, attentionTrial, { enrolledOn: ENROLLED, site: 'SB' });
    await addAssessmentsDirectly(stack.db, {
      trialId: attentionTrial.trialId,
      patientId: early.id,
      assessments: [
        { date: day(-10), response: 'SD' },
        { date: day(20), response: 'SD' },
        { date: day(150), response: 'SD' },
      ],
    });
    const quiet = await enrolOne(stack.db, attentionTrial, { enrolledOn: ENROLLED, site: 'SB' });
    await addAssessmentsDirectly(stack.db, { trialId: attentionTrial.trialId, patientId: quiet.id, assessments: [{ date: day(56), response: 'PD' }] });
    await stack.db.transaction(async (trx) => {
      for (const p of [lonePr, early, quiet]) await recomputeDerivation(trx, p.id);
    });

    const all = await sam.get(aurl);
    expect(all.status).toBe(200);
    const kinds = (code: string) =>
      all.body.sites.find((s: { siteCode: string }) => s.siteCode === code).items.map((i: { kind: string; studyId: string }) => `${i.studyId} ${i.kind}`);
    expect(kinds('SA')).toEqual([`${lonePr.studyId} unconfirmed-past-window`]);
    expect(kinds('SB')).toEqual([`${early.studyId} assessment-before-enrolment`, `${early.studyId} gap-longer-than-schedule`]);
    expect((await mona.get(aurl)).body.sites).toHaveLength(2);

    const coordinatorView = await cora.get(aurl);
    expect(coordinatorView.body.sites.map((s: { siteCode: string }) => s.siteCode)).toEqual(['SA']);
    const investigatorView = await ivan.get(aurl);
    expect(investigatorView.body.sites.map((s: { siteCode: string }) => s.siteCode)).toEqual(['SB']);
  });
});
