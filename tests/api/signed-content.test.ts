/**
 * What a signature covers cannot change afterwards, over HTTP on the real stack: a data cut's
 * prior is part of a signed recommendation, so a new prior is a new analysis version; a report
 * version's hash is fixed once issued; any change of an attested outcome — by the form, by
 * derivation from assessments, by a change of the protocol's settings — clears the attestation with
 * an audit row, and a data cut then counts the outcome as unattested.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { arrangeCohort, freezeCutDirectly, outcomes } from '../support/data-cut-factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { daysFromToday, enrolOne, setOutcomeSettings } from '../support/assessment-factories.js';
import { protocolSettingsBody } from '../support/people-factories.js';
import { contentHash } from '../../server/signatures/signatures.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let sam: Session;
let mona: Session;
let ivan: Session;

beforeAll(async () => {
  stack = await startStack();
  [sam, mona, ivan] = await Promise.all([stack.signIn(DEMO.statistician), stack.signIn(DEMO.monitor), stack.signIn(DEMO.investigator)]);
}, 120_000);
afterAll(async () => stack?.close());

const rationale = 'Stage 1 passed; no safety concern raised.';

async function interimCut() {
  const trial = await createTrial(stack.db);
  await arrangeCohort(stack.db, trial, { design: { cohortStatus: 'interim_review' }, patients: { SA: outcomes(4, 9) } });
  return freezeCutDirectly(stack.db, trial);
}

async function signRecommendation(member: Session, cutId: string, analysisVersion: number) {
  await member.confirmToSign('recommendation', cutId);
  return member.post(`/api/data-cuts/${cutId}/recommendations`, { decision: 'continue', rationale, analysisVersion });
}

async function report(session: Session, cutId: string) {
  const response = await session
    .get(`/api/data-cuts/${cutId}/report.pdf`)
    .buffer(true)
    .parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    });
  expect(response.status).toBe(200);
  const hash = createHash('sha256').update(response.body as Buffer).digest('hex');
  expect(response.headers['x-report-sha256']).toBe(hash);
  return { hash, version: Number(response.headers['x-report-version']) };
}

describe('the prior of a signed cut', () => {
  it('when the prior of a cut with a signed recommendation is edited, then a new analysis version starts with its own audit row and the signed one stays as it was', async () => {
    const cut = await interimCut();
    const signed = await signRecommendation(mona, cut.id, 1);
    expect(signed.status).toBe(201);
    const [recommendation] = signed.body.recommendations;
    const [versionOne] = await stack.db('analysis_versions').where({ data_cut_id: cut.id });
    // The prior the member saw is part of what the signature covers.
    expect(recommendation.signature.contentHash).toBe(
      contentHash({
        dataCutId: cut.id,
        contentHash: cut.contentHash,
        analysisVersion: { id: versionOne.id, version: 1, prior: { a: null, b: null, thetaT: 0.9 } },
        decision: 'continue',
        rationale,
      }),
    );

    const saved = await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 1, b: 1, thetaT: 0.95, version: 1 });
    expect(saved.status).toBe(200);
    expect(saved.body.dataCut).toMatchObject({ version: 2, prior: { a: 1, b: 1, thetaT: 0.95 } });
    const versions = await stack.db('analysis_versions').where({ data_cut_id: cut.id }).orderBy('version');
    expect(versions.map((v) => [v.version, v.prior_a, v.prior_b, v.theta_t])).toEqual([
      [1, null, null, 0.9],
      [2, 1, 1, 0.95],
    ]);
    const audit = await stack.db('audit_log').where({ entity_id: cut.id, action: 'prior_changed' });
    expect(audit).toEqual([expect.objectContaining({ before: expect.objectContaining({ analysisVersion: 1 }), after: expect.objectContaining({ analysisVersion: 2, a: 1, b: 1 }) })]);

    const { recommendations } = (await sam.get(`/api/data-cuts/${cut.id}/recommendations`)).body;
    expect(recommendations).toEqual([expect.objectContaining({ id: recommendation.id, analysisVersion: 1 })]);
    expect((await stack.db('recommendations').where({ id: recommendation.id }).first()).analysis_version_id).toBe(versionOne.id);
    await expect(stack.db('analysis_versions').where({ id: versionOne.id }).update({ prior_a: 5, prior_b: 5 })).rejects.toThrow(/append-only/);
  });

  it('when a member signs on an analysis version that is no longer current, then 409 and nothing is signed; on the current one it names that version', async () => {
    const cut = await interimCut();
    expect((await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 2, b: 3, thetaT: 0.9, version: 1 })).status).toBe(200);
    const stale = await signRecommendation(mona, cut.id, 1);
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ analysisVersion: 2 });
    expect(await stack.db('recommendations').where({ data_cut_id: cut.id }).first()).toBeUndefined();
    const current = await mona.post(`/api/data-cuts/${cut.id}/recommendations`, { decision: 'continue', rationale, analysisVersion: 2 });
    expect(current.status).toBe(201);
    expect(current.body.recommendations[0].signature.meaning).toMatch(/having reviewed its analysis version 2\.$/);
  });
});

describe('the report of a cut', () => {
  it('when the report is fetched again, then its hash is the one first issued; a new recommendation or prior issues the next version and the earlier stay as they were', async () => {
    const cut = await interimCut();
    const first = await report(mona, cut.id);
    expect(first.version).toBe(1);
    expect(await report(sam, cut.id)).toEqual(first);
    expect(await report(mona, cut.id)).toEqual(first);
    expect(await stack.db('data_cut_reports').where({ data_cut_id: cut.id }).count({ n: '*' }).first()).toEqual({ n: 1 });
    expect((await mona.get(`/api/data-cuts/${cut.id}`)).body.dataCut.reportHash).toBe(first.hash);

    expect((await signRecommendation(mona, cut.id, 1)).status).toBe(201);
    const second = await report(sam, cut.id);
    expect(second.version).toBe(2);
    expect(second.hash).not.toBe(first.hash);
    expect(await report(mona, cut.id)).toEqual(second);

    expect((await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 1, b: 1, thetaT: 0.9, version: 1 })).status).toBe(200);
    const third = await report(sam, cut.id);
    expect(third.version).toBe(3);

    const stored = await stack.db('data_cut_reports').where({ data_cut_id: cut.id }).orderBy('seq');
    expect(stored.map((r) => [r.seq, r.sha256])).toEqual([
      [1, first.hash],
      [2, second.hash],
      [3, third.hash],
    ]);
    const issued = await stack.db('audit_log').where({ entity_id: cut.id, action: 'report_issued' }).orderBy('id');
    expect(issued.map((a) => a.after.reportVersion)).toEqual([1, 2, 3]);
    await expect(stack.db('data_cut_reports').where({ data_cut_id: cut.id }).update({ sha256: 'rewritten' })).rejects.toThrow(/append-only/);
  });
});

describe('an attested outcome that changes', () => {
  /** A trial whose outcomes are derived from assessments (no confirmation needed), with a locked design. */
  async function derivedTrial(): Promise<TrialFixture> {
    const trial = await createTrial(stack.db);
    await setOutcomeSettings(stack.db, trial.trialId, { outcomeSource: 'derived', confirmationRequired: false });
    await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
    return trial;
  }

  /** The investigator records a PR at their site (SB), the outcome is derived, then they attest it. */
  async function attestedResponder(trial: TrialFixture) {
    const patient = await enrolOne(stack.db, trial, { site: 'SB', enrolledOn: daysFromToday(-200) });
    const assessed = await ivan.post(`/api/trials/${trial.trialId}/patients/${patient.id}/assessments`, { date: daysFromToday(-140), response: 'PR' });
    expect(assessed.status, assessed.text).toBe(201);
    expect(assessed.body.patient).toMatchObject({ outcome: 'responder', bestOverallResponse: 'PR' });
    await ivan.confirmToSign('attestation', patient.id);
    const attested = await ivan.post(`/api/trials/${trial.trialId}/patients/${patient.id}/attestation`, { version: assessed.body.patient.version });
    expect(attested.status, attested.text).toBe(201);
    return { patient, signatureId: attested.body.signature.id as string };
  }

  it('when a new assessment changes the derived outcome, then the attestation is cleared with an audit row and a data cut counts the outcome as unattested', async () => {
    const trial = await derivedTrial();
    const { patient, signatureId } = await attestedResponder(trial);
    const assessed = await ivan.post(`/api/trials/${trial.trialId}/patients/${patient.id}/assessments`, { date: daysFromToday(-84), response: 'CR' });
    expect(assessed.status, assessed.text).toBe(201);
    expect(assessed.body.patient).toMatchObject({ bestOverallResponse: 'CR' });
    expect((await ivan.get(`/api/trials/${trial.trialId}/patients/${patient.id}`)).body.patient.attested).toBeNull();
    const derived = await stack.db('audit_log').where({ entity_id: patient.id, action: 'outcome_derived' }).orderBy('id', 'desc').first();
    expect(derived.after).toMatchObject({ bestOverallResponse: 'CR', attestationCleared: true, clearedAttestationSignatureId: signatureId });

    const cut = await freezeCutDirectly(stack.db, trial);
    expect(cut.counts.unattested).toBe(1);
    expect(await stack.db('data_cut_patients').where({ data_cut_id: cut.id, patient_id: patient.id }).first()).toMatchObject({ attested: false, attestation_signature_id: null });
  });

  it('when a change of the protocol settings changes the derived outcome, then the attestation is cleared with an audit row', async () => {
    const trial = await derivedTrial();
    const { patient, signatureId } = await attestedResponder(trial);
    const changed = await sam.patch(
      `/api/trials/${trial.trialId}/protocol-settings`,
      protocolSettingsBody(1, { confirmationRequired: true, reason: 'Protocol amendment: responses need confirmation' }),
    );
    expect(changed.status, changed.text).toBe(200);
    const after = await stack.db('patients').where({ id: patient.id }).first();
    expect(after.attestation_signature_id).toBeNull();
    expect(after.best_overall_response).not.toBe('PR');
    const derived = await stack.db('audit_log').where({ entity_id: patient.id, action: 'outcome_derived' }).orderBy('id', 'desc').first();
    expect(derived).toMatchObject({ after: expect.objectContaining({ attestationCleared: true, clearedAttestationSignatureId: signatureId }) });
    expect(derived.actor_user_id).toBe((await stack.db('users').where({ email: DEMO.statistician }).first()).id);
  });

  it('when anything changes an attested outcome without clearing its attestation, then the database refuses', async () => {
    const trial = await derivedTrial();
    const { patient } = await attestedResponder(trial);
    await expect(stack.db('patients').where({ id: patient.id }).update({ best_overall_response: 'CR' })).rejects.toThrow(/attested outcome cannot change/);
    expect(await stack.db('patients').where({ id: patient.id }).update({ best_overall_response: 'CR', attestation_signature_id: null })).toBe(1);
  });
});
