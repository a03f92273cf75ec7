/**
 * Patients and outcomes over HTTP: site scoping, who receives patient-level rows, enrolment rules,
 * the interim accrual pause with its e-mails, outcomes, corrections, optimistic locking, attestation
 * and the per-patient history. Every write is checked for exactly one audit row.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
const s = {} as Record<'coordinator' | 'investigator' | 'statistician' | 'monitor' | 'admin' | 'sponsor', Session>;

const base = () => `/api/trials/${trial.trialId}/patients`;
const auditCount = async (entityId: string) => Number((await stack.db('audit_log').where({ entity_type: 'patient', entity_id: entityId }).count({ c: '*' }))[0].c);
const daysAgo = (days: number) => new Date(Date.now() - days * 86_400_000).toISOString().slice(0, 10);

beforeAll(async () => {
  // A short signing window so one test can let the sign-in go stale.
  stack = await startStack();
  trial = await createTrial(stack.db);
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], p0: 0.1, p1: 0.3, r1: 1, n1: 10, r: 5, n: 29 });
  for (const role of ['coordinator', 'investigator', 'statistician', 'monitor', 'admin', 'sponsor'] as const) s[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

describe('site scoping and who sees patient-level rows', () => {
  let atSa: string;
  let atSb: string;
  beforeAll(async () => {
    [{ id: atSa }] = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, count: 1 });
    [{ id: atSb }] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SB,
      patients: [{ outcome: 'responder', bestOverallResponse: 'CR' }],
    });
  });

  it('when the coordinator at SA lists patients, then only SA patients come back, with counts by outcome', async () => {
    const res = await s.coordinator.get(base());
    expect(res.status).toBe(200);
    expect(res.body.patients.map((p: { siteCode: string }) => p.siteCode)).toEqual(expect.arrayContaining(['SA']));
    expect(res.body.patients.every((p: { siteCode: string }) => p.siteCode === 'SA')).toBe(true);
    expect(res.body.counts).toMatchObject({ total: res.body.total, responder: 0 });
    expect(res.body.enrolSites.map((x: { code: string }) => x.code)).toEqual(['SA']);
  });

  it('when the coordinator at SA reaches an SB patient through every patient route, then each answers 404 and nothing is written', async () => {
    const before = await auditCount(atSb);
    expect((await s.coordinator.get(`${base()}/${atSb}`)).status).toBe(404);
    expect((await s.coordinator.get(`${base()}/${atSb}/history`)).status).toBe(404);
    const patch = await s.coordinator.patch(`${base()}/${atSb}`, { version: 1, outcome: 'non_responder', bestOverallResponse: 'PD', responseAssessedOn: daysAgo(1), evaluable: true, reason: 'x' });
    expect(patch.status).toBe(404);
    // The payload is judged only for a patient the user may see: nothing about the record leaks through a 400.
    expect((await s.coordinator.patch(`${base()}/${atSb}`, { version: 'x', outcome: 'nonsense' })).status).toBe(404);
    expect((await s.investigator.post(`${base()}/${atSa}/attestation`, { version: 1 })).status).toBe(404);
    const enrolElsewhere = await s.coordinator.post(base(), { studyId: 'SB-900', siteId: trial.siteIds.SB, enrolledOn: daysAgo(3) });
    expect(enrolElsewhere.status).toBe(404);
    expect(await auditCount(atSb)).toBe(before);
  });

  it('when the statistician and the monitor list patients, then every site is there', async () => {
    for (const who of [s.statistician, s.monitor]) {
      const res = await who.get(base());
      expect(res.status).toBe(200);
      expect(new Set(res.body.patients.map((p: { siteCode: string }) => p.siteCode))).toEqual(new Set(['SA', 'SB']));
    }
  });

  it('when an admin or a sponsor asks for patients, then 403 on every patient route and no patient-level keys in the evaluation', async () => {
    for (const who of [s.admin, s.sponsor]) {
      for (const path of [base(), `${base()}/${atSa}`, `${base()}/${atSa}/history`, `${base()}/export.csv`]) {
        const res = await who.get(path);
        expect(res.status).toBe(403);
        expect(JSON.stringify(res.body)).not.toMatch(/studyId|SA-0/);
      }
      const evaluation = await who.get(`/api/trials/${trial.trialId}/evaluation`);
      expect(evaluation.status).toBe(200);
      const text = JSON.stringify(evaluation.body);
      for (const key of ['studyId', 'patientId', 'siteCode', 'enrolledOn', 'bestOverallResponse', 'SA-0', 'SB-0']) expect(text).not.toContain(key);
    }
  });

  it('when the sponsor reads the evaluation of a design that does not release response figures, then only enrolment counts are there', async () => {
    const res = await s.sponsor.get(`/api/trials/${trial.trialId}/evaluation`);
    for (const key of ['responders', 'rate', 'test', 'rule', 'path']) expect(res.body.cohorts[0]).not.toHaveProperty(key);
    expect(res.body.cohorts[0].efficacyHidden).toMatch(/sponsors/);
    expect(res.body.cohorts[0].enrolled).toBeGreaterThan(0);
  });
});

describe('enrolment', () => {
  it('when the coordinator enrols at their site, then the patient is stage 1, the study ID is upper case, and one audit row is written', async () => {
    const res = await s.coordinator.post(base(), { studyId: 'sa-101', siteId: trial.siteIds.SA, enrolledOn: daysAgo(5) });
    expect(res.status).toBe(201);
    expect(res.body.patient).toMatchObject({ studyId: 'SA-101', siteCode: 'SA', stage: 1, outcome: 'pending', version: 1, attested: null });
    expect(Object.keys(res.body.patient)).toEqual(
      expect.arrayContaining(['id', 'studyId', 'siteId', 'siteCode', 'cohortId', 'cohortCode', 'stage', 'enrolledOn', 'outcome', 'bestOverallResponse', 'responseAssessedOn', 'evaluable', 'notEvaluableReason', 'attested', 'version', 'derivedBestOverallResponse', 'derivedResponder', 'derivation', 'outcomeFlag']),
    );
    expect(await auditCount(res.body.patient.id)).toBe(1);
  });

  it('when the study ID is taken, the prefix is another site, the date is in the future or before the trial start, then the enrolment is refused and nothing is written', async () => {
    const before = await stack.db('patients').where({ trial_id: trial.trialId }).count({ c: '*' });
    const dup = await s.coordinator.post(base(), { studyId: 'SA-101', siteId: trial.siteIds.SA, enrolledOn: daysAgo(4) });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields.studyId).toMatch(/already used/);
    const prefix = await s.coordinator.post(base(), { studyId: 'SB-102', siteId: trial.siteIds.SA, enrolledOn: daysAgo(4) });
    expect(prefix.status).toBe(400);
    expect(prefix.body.error.fields.studyId).toMatch(/SA-/);
    const future = await s.coordinator.post(base(), { studyId: 'SA-103', siteId: trial.siteIds.SA, enrolledOn: daysAgo(-3) });
    expect(future.status).toBe(400);
    expect(future.body.error.fields.enrolledOn).toMatch(/future/);
    const early = await s.coordinator.post(base(), { studyId: 'SA-104', siteId: trial.siteIds.SA, enrolledOn: '2025-06-01' });
    expect(early.status).toBe(400);
    expect(early.body.error.fields.enrolledOn).toMatch(/started/);
    expect(await stack.db('patients').where({ trial_id: trial.trialId }).count({ c: '*' })).toEqual(before);
  });

  it('when the statistician tries to enrol, then 403: site data are entered by the site roles', async () => {
    const res = await s.statistician.post(base(), { studyId: 'SA-150', siteId: trial.siteIds.SA, enrolledOn: daysAgo(2) });
    expect(res.status).toBe(403);
  });

  it('when two enrolments arrive at once, then both get distinct enrolment numbers', async () => {
    const [a, b] = await Promise.all([
      s.coordinator.post(base(), { studyId: 'SA-201', siteId: trial.siteIds.SA, enrolledOn: daysAgo(2) }),
      s.investigator.post(base(), { studyId: 'SB-201', siteId: trial.siteIds.SB, enrolledOn: daysAgo(2) }),
    ]);
    expect([a.status, b.status]).toEqual([201, 201]);
    const seqs = await stack.db('patients').whereIn('id', [a.body.patient.id, b.body.patient.id]).pluck('enrolment_seq');
    expect(new Set(seqs).size).toBe(2);
  });

  it('when a trial has several cohorts, then the cohort is required', async () => {
    const basket = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    for (const cohortId of basket.cohortIds) await lockDesignDirectly(stack.db, { trialId: basket.trialId, cohortId });
    const res = await s.coordinator.post(`/api/trials/${basket.trialId}/patients`, { studyId: 'SA-1', siteId: basket.siteIds.SA, enrolledOn: daysAgo(2) });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.cohortId).toMatch(/several cohorts/);
    const ok = await s.coordinator.post(`/api/trials/${basket.trialId}/patients`, { studyId: 'SA-1', siteId: basket.siteIds.SA, cohortId: basket.cohortIds[1], enrolledOn: daysAgo(2) });
    expect(ok.status).toBe(201);
    expect(ok.body.patient.cohortCode).toBe('B');
  });

  it('when the cohort has no locked design, then enrolment is refused with 409', async () => {
    const draft = await createTrial(stack.db);
    const res = await s.coordinator.post(`/api/trials/${draft.trialId}/patients`, { studyId: 'SA-1', siteId: draft.siteIds.SA, enrolledOn: daysAgo(2) });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/no locked design/);
  });
});

describe('the interim accrual pause', () => {
  it('when the n1-th patient is enrolled, then the cohort moves to interim review, the statistician and the monitor get one e-mail each, and the next enrolment is refused (409)', async () => {
    const t = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], r1: 0, n1: 3, r: 2, n: 8 });
    await enrolPatientsDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], siteId: t.siteIds.SA, count: 2 });
    const third = await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-3', siteId: t.siteIds.SA, enrolledOn: daysAgo(1) });
    expect(third.status).toBe(201);
    expect(third.body.patient.stage).toBe(1);
    expect(third.body.accrual).toEqual({ paused: true, continuesAtRisk: false });
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('interim_review');
    const mails = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject.startsWith(`${t.code} MAIN: stage 1 complete`));
      return got.length >= 2 ? got : undefined;
    });
    expect(mails.flatMap((m) => m.to).sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
    expect(mails[0].text).toMatch(/Accrual is paused/);
    const fourth = await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-4', siteId: t.siteIds.SA, enrolledOn: daysAgo(1) });
    expect(fourth.status).toBe(409);
    expect(fourth.body.error.message).toMatch(/^Accrual is paused for the interim review/);
    expect(await stack.db('mail_outbox').where('subject', 'like', `${t.code} MAIN: stage 1 complete%`).count({ c: '*' })).toEqual([{ c: 2 }]);
  });

  it('when the design lets accrual continue at risk, then the cohort still goes to interim review but enrolment goes on into stage 2', async () => {
    const t = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], r1: 0, n1: 2, r: 2, n: 8, interimAccrual: 'continue_at_risk' });
    await enrolPatientsDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], siteId: t.siteIds.SA, count: 1 });
    const second = await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-2', siteId: t.siteIds.SA, enrolledOn: daysAgo(1) });
    expect(second.body.accrual).toEqual({ paused: false, continuesAtRisk: true });
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('interim_review');
    const third = await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-3', siteId: t.siteIds.SA, enrolledOn: daysAgo(1) });
    expect(third.status).toBe(201);
    expect(third.body.patient.stage).toBe(2);
  });

  it('when only evaluable patients count and a stage-1 patient turns out not evaluable, then the next enrolment takes the freed stage-1 place', async () => {
    const t = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], r1: 0, n1: 2, r: 2, n: 8, analysisPopulation: 'evaluable', interimAccrual: 'continue_at_risk' });
    const [first] = await enrolPatientsDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], siteId: t.siteIds.SA, count: 1, firstEnrolledOn: daysAgo(30) });
    const change = await s.coordinator.patch(`/api/trials/${t.trialId}/patients/${first.id}`, {
      version: 1,
      outcome: 'pending',
      evaluable: false,
      notEvaluableReason: 'Withdrew consent before the first scan',
    });
    expect(change.status).toBe(200);
    await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-2', siteId: t.siteIds.SA, enrolledOn: daysAgo(2) });
    const third = await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-3', siteId: t.siteIds.SA, enrolledOn: daysAgo(1) });
    expect(third.body.patient.stage).toBe(1);
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('interim_review');
  });
  it('when an outcome correction makes the n1-th patient count (evaluable again), then the cohort moves to interim review and the mail names the trial', async () => {
    const t = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], r1: 0, n1: 2, r: 2, n: 8, analysisPopulation: 'evaluable' });
    const [first] = await enrolPatientsDirectly(stack.db, { trialId: t.trialId, cohortId: t.cohortIds[0], siteId: t.siteIds.SA, count: 1, firstEnrolledOn: daysAgo(30) });
    const notEvaluable = { version: 1, outcome: 'pending', evaluable: false, notEvaluableReason: 'Scan lost' };
    expect((await s.coordinator.patch(`/api/trials/${t.trialId}/patients/${first.id}`, notEvaluable)).status).toBe(200);
    expect((await s.coordinator.post(`/api/trials/${t.trialId}/patients`, { studyId: 'SA-2', siteId: t.siteIds.SA, enrolledOn: daysAgo(2) })).status).toBe(201);
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('enrolling_stage_1');
    const found = await s.coordinator.patch(`/api/trials/${t.trialId}/patients/${first.id}`, { version: 2, outcome: 'pending', evaluable: true, reason: 'Scan found' });
    expect(found.status).toBe(200);
    expect(found.body.accrual).toEqual({ paused: true, continuesAtRisk: false });
    expect((await stack.db('cohorts').where({ id: t.cohortIds[0] }).first()).status).toBe('interim_review');
    const queued = await stack.db('mail_outbox').where('subject', `${t.code} MAIN: stage 1 complete — interim review`).pluck('to_address');
    expect(queued.sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
  });
});

describe('outcomes, corrections and optimistic locking', () => {
  let patientId: string;
  beforeAll(async () => {
    [{ id: patientId }] = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, count: 1, firstEnrolledOn: daysAgo(90) });
  });

  it('when the first outcome is recorded, then no reason is needed, the version goes up and one audit row is written', async () => {
    const res = await s.coordinator.patch(`${base()}/${patientId}`, { version: 1, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: daysAgo(30), evaluable: true });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ changed: true, correction: false, attestationCleared: false, patient: { outcome: 'responder', version: 2 } });
    expect(await auditCount(patientId)).toBe(1);
  });

  it('when the outcome and response disagree, or the assessment precedes enrolment, then 400 with the field', async () => {
    const mismatch = await s.coordinator.patch(`${base()}/${patientId}`, { version: 2, outcome: 'responder', bestOverallResponse: 'SD', responseAssessedOn: daysAgo(30), evaluable: true, reason: 'r' });
    expect(mismatch.status).toBe(400);
    expect(mismatch.body.error.fields.bestOverallResponse).toMatch(/CR or PR/);
    const early = await s.coordinator.patch(`${base()}/${patientId}`, { version: 2, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: daysAgo(200), evaluable: true, reason: 'r' });
    expect(early.status).toBe(400);
    expect(early.body.error.fields.responseAssessedOn).toMatch(/enrolled/);
    const noReason = await s.coordinator.patch(`${base()}/${patientId}`, { version: 2, outcome: 'pending', evaluable: false });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.notEvaluableReason).toBeDefined();
  });

  it('when a recorded outcome is changed without a reason, then 400 and nothing is written', async () => {
    const before = await stack.db('patients').where({ id: patientId }).first();
    const res = await s.coordinator.patch(`${base()}/${patientId}`, { version: 2, outcome: 'non_responder', bestOverallResponse: 'PD', responseAssessedOn: daysAgo(30), evaluable: true });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.reason).toMatch(/correction needs a reason/);
    expect(await stack.db('patients').where({ id: patientId }).first()).toEqual(before);
    expect(await auditCount(patientId)).toBe(1);
  });

  it('when a correction carries a reason, then one audit row keeps before, after and the reason', async () => {
    const res = await s.coordinator.patch(`${base()}/${patientId}`, {
      version: 2,
      outcome: 'non_responder',
      bestOverallResponse: 'PD',
      responseAssessedOn: daysAgo(30),
      evaluable: true,
      reason: 'Central review: progression',
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ correction: true, patient: { version: 3, outcome: 'non_responder' } });
    expect(await auditCount(patientId)).toBe(2);
    const last = await stack.db('audit_log').where({ entity_id: patientId }).orderBy('id', 'desc').first();
    expect(last).toMatchObject({ action: 'outcome_corrected', reason: 'Central review: progression' });
    expect(last.before).toMatchObject({ outcome: 'responder', bestOverallResponse: 'PR' });
    expect(last.after).toMatchObject({ outcome: 'non_responder', bestOverallResponse: 'PD' });
  });

  it('when an edit carries a stale version, then 409 with the current record and nothing is written', async () => {
    const res = await s.coordinator.patch(`${base()}/${patientId}`, { version: 2, outcome: 'responder', bestOverallResponse: 'CR', responseAssessedOn: daysAgo(30), evaluable: true, reason: 'late' });
    expect(res.status).toBe(409);
    expect(res.body.error.current).toMatchObject({ id: patientId, version: 3, outcome: 'non_responder', bestOverallResponse: 'PD' });
    expect(await auditCount(patientId)).toBe(2);
  });

  it('when nothing changes, then nothing is written', async () => {
    const res = await s.coordinator.patch(`${base()}/${patientId}`, { version: 3, outcome: 'non_responder', bestOverallResponse: 'PD', responseAssessedOn: daysAgo(30), evaluable: true });
    expect(res.status).toBe(200);
    expect(res.body.changed).toBe(false);
    expect(await auditCount(patientId)).toBe(2);
  });

  it('when the history is read, then every audit entry is there with who, when, before, after and reason', async () => {
    const res = await s.statistician.get(`${base()}/${patientId}/history`);
    expect(res.status).toBe(200);
    expect(res.body.entries.map((e: { action: string }) => e.action)).toEqual(['outcome_recorded', 'outcome_corrected']);
    expect(res.body.entries[1]).toMatchObject({ actor: { email: DEMO.coordinator }, reason: 'Central review: progression', before: { outcome: 'responder' } });
  });
});

describe('attestation by the site investigator', () => {
  let patientId: string;
  beforeAll(async () => {
    [{ id: patientId }] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SB,
      patients: [{ outcome: 'responder', bestOverallResponse: 'PR', enrolledOn: daysAgo(80), responseAssessedOn: daysAgo(20) }],
    });
  });

  it('when no password was entered for this attestation, then 401 reauthentication_required; after entering it the attestation is stored with one audit row', async () => {
    const unconfirmed = await s.investigator.post(`${base()}/${patientId}/attestation`, { version: 1 });
    expect(unconfirmed.status).toBe(401);
    expect(unconfirmed.body.error).toMatchObject({ code: 'reauthentication_required', reauthUrl: `/auth/login?intent=attestation&subject=${patientId}` });
    await s.investigator.confirmToSign('attestation', patientId);
    const signed = await s.investigator.post(`${base()}/${patientId}/attestation`, { version: 1 });
    expect(signed.status).toBe(201);
    expect(signed.body.signature.meaning).toMatch(/^I attest that the outcome recorded for SB-\d+ is accurate and complete\.$/);
    expect(signed.body.patient.attested).toMatchObject({ signerEmail: DEMO.investigator, signatureId: signed.body.signature.id });
    expect(await auditCount(patientId)).toBe(1);
  });

  it('when the coordinator tries to attest, then 403: only investigators sign', async () => {
    expect((await s.coordinator.post(`${base()}/${patientId}/attestation`, { version: 2 })).status).toBe(403);
  });

  it('when an attested outcome is edited, then the attestation is cleared and the response says so', async () => {
    const res = await s.investigator.patch(`${base()}/${patientId}`, {
      version: 2,
      outcome: 'responder',
      bestOverallResponse: 'CR',
      responseAssessedOn: daysAgo(20),
      evaluable: true,
      reason: 'Confirmation scan showed complete response',
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ attestationCleared: true, patient: { attested: null, bestOverallResponse: 'CR' } });
    const last = await stack.db('audit_log').where({ entity_id: patientId }).orderBy('id', 'desc').first();
    expect(last.after).toMatchObject({ attestationCleared: true });
    expect(await auditCount(patientId)).toBe(2);
  });
});
