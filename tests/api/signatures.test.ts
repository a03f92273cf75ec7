/**
 * Electronic signatures under 21 CFR Part 11 (§11.50, §11.100, §11.200), over HTTP on the real
 * stack: every signature consumes one password entry at the identity provider, made for that
 * signature's intent, in that session, used once; the provider must say when the password was
 * entered; the signature keeps the printed name as it was; signatures, design versions and
 * recommendations are append-only in the database.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, startStack, startStackOn, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { lockBody } from '../support/design-factories.js';
import { arrangeCohort, freezeCutDirectly, outcomes, recommendDirectly } from '../support/data-cut-factories.js';
import { enrolPatientsDirectly } from '../support/patient-factories.js';
import type { Session } from '../support/sign-in.js';
import type { DataCut } from '../../server/data-cuts/data-cuts.repository.js';

let stack: Stack;

beforeAll(async () => {
  stack = await startStack();
}, 120_000);
afterAll(async () => stack?.close());

const recommendation = { decision: 'continue', rationale: 'Stage 1 passed; no safety concern raised.', analysisVersion: 1 };
const recommend = (s: Session, cutId: string) => s.post(`/api/data-cuts/${cutId}/recommendations`, recommendation);
const lockPath = (t: TrialFixture, cohort = 0) => `/api/trials/${t.trialId}/cohorts/${t.cohortIds[cohort]}/design`;

/** A paused cohort with a frozen interim cut, on a trial of its own. */
async function interimCut(): Promise<{ trial: TrialFixture; cut: DataCut; cutId: string }> {
  const trial = await createTrial(stack.db);
  await arrangeCohort(stack.db, trial, { design: { cohortStatus: 'interim_review' }, patients: { SA: outcomes(4, 9) } });
  const cut = await freezeCutDirectly(stack.db, trial);
  return { trial, cut, cutId: cut.id };
}

describe('one password entry, one signature', () => {
  it('when a committee member signs recommendations on two cuts back to back in one session, then the second is refused until the password is entered again for it', async () => {
    const [a, b] = [await interimCut(), await interimCut()];
    const mona = await stack.signIn(DEMO.monitor);
    await mona.confirmToSign('recommendation', a.cutId);
    // Who is signed in says which signature the entry is for (the sign form offers its last step), until it is used.
    const ready = (await mona.get('/api/me')).body.signingReady;
    expect(ready).toEqual([{ action: 'recommendation', subjectId: a.cutId, expiresAt: expect.stringMatching(/^\d{4}-\d\d-\d\dT.*Z$/) }]);
    expect(Date.parse(ready[0].expiresAt)).toBeGreaterThan(Date.now());
    expect((await recommend(mona, a.cutId)).status).toBe(201);
    expect((await mona.get('/api/me')).body.signingReady).toEqual([]);

    const second = await recommend(mona, b.cutId);
    expect(second.status).toBe(401);
    expect(second.body.error).toMatchObject({ code: 'reauthentication_required', reauthUrl: `/auth/login?intent=recommendation&subject=${b.cutId}` });
    expect(await stack.db('recommendations').where({ data_cut_id: b.cutId }).first()).toBeUndefined();

    await mona.confirmToSign('recommendation', b.cutId);
    expect((await recommend(mona, b.cutId)).status).toBe(201);
    const signatures = await stack.db('signatures').where({ subject_type: 'recommendation' }).whereIn('subject_id', [a.cutId, b.cutId]);
    expect(new Set(signatures.map((s) => s.signing_authentication_id)).size).toBe(2);
  });

  it('when a password was entered for one intent, then it signs nothing else: not another cut, another cohort, another kind of signature', async () => {
    const { trial, cutId } = await interimCut();
    const other = await interimCut();
    const mona = await stack.signIn(DEMO.monitor);
    await mona.confirmToSign('recommendation', other.cutId);
    expect((await recommend(mona, cutId)).status).toBe(401);

    const designTrial = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    const sam = await stack.signIn(DEMO.statistician);
    await sam.confirmToSign('design', designTrial.cohortIds[0]);
    expect((await sam.post(lockPath(designTrial, 1), lockBody())).status).toBe(401);
    // The right record under another action (an amendment's password for a lock) does not count either.
    await sam.confirmToSign('amendment', designTrial.cohortIds[1]);
    expect((await sam.post(lockPath(designTrial, 1), lockBody())).status).toBe(401);
    expect(await stack.db('design_versions').whereIn('cohort_id', designTrial.cohortIds).first()).toBeUndefined();

    const [patient] = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SB, patients: [{ outcome: 'responder' }] });
    const ivan = await stack.signIn(DEMO.investigator);
    await ivan.confirmToSign('recommendation', cutId);
    expect((await ivan.post(`/api/trials/${trial.trialId}/patients/${patient.id}/attestation`, { version: 1 })).status).toBe(401);
    // Still unused, the password entered for the first cohort signs that cohort's design.
    expect((await sam.post(lockPath(designTrial, 0), lockBody())).status).toBe(201);
  });

  it('when a statistician signs a design and then a new version of it, then each needs its own password entry', async () => {
    const trial = await createTrial(stack.db);
    const sam = await stack.signIn(DEMO.statistician);
    await sam.confirmToSign('design', trial.cohortIds[0]);
    expect((await sam.post(lockPath(trial), lockBody())).status).toBe(201);
    const revision = lockBody({ selection: 'minimax', reason: 'Smaller maximum size', basedOnVersion: 1 });
    expect((await sam.post(lockPath(trial), revision)).status).toBe(401);
    await sam.confirmToSign('design', trial.cohortIds[0]);
    expect((await sam.post(lockPath(trial), revision)).status).toBe(201);
  });

  it('when the person has only signed in, then nothing can be signed: an ordinary sign-in is no signature password', async () => {
    const { cutId } = await interimCut();
    const mona = await stack.signIn(DEMO.monitor);
    const response = await recommend(mona, cutId);
    expect(response.status).toBe(401);
    expect(await stack.db('signing_authentications').where({ intent_subject_id: cutId }).first()).toBeUndefined();
  });

  it('when the same person entered the password in another browser session, then this session cannot use it', async () => {
    const { cutId } = await interimCut();
    const laptop = await stack.signIn(DEMO.monitor);
    const tablet = await stack.signIn(DEMO.monitor);
    await laptop.confirmToSign('recommendation', cutId);
    expect((await recommend(tablet, cutId)).status).toBe(401);
    expect((await recommend(laptop, cutId)).status).toBe(201);
  });

  it('when a signature is refused for another reason after the password was entered, then the entry stays usable for the corrected request', async () => {
    const { cutId } = await interimCut();
    const mona = await stack.signIn(DEMO.monitor);
    await mona.confirmToSign('recommendation', cutId);
    const stale = await mona.post(`/api/data-cuts/${cutId}/recommendations`, { ...recommendation, analysisVersion: 2 });
    expect(stale.status).toBe(409);
    expect((await recommend(mona, cutId)).status).toBe(201);
  });

  it('when the signature is recorded, then it keeps the printed name of that moment, the meaning, the time and the content hash; a later change of name does not reach it', async () => {
    const trial = await createTrial(stack.db);
    const sam = await stack.signIn(DEMO.statistician);
    await sam.confirmToSign('design', trial.cohortIds[0]);
    const { design } = (await sam.post(lockPath(trial), lockBody())).body;
    expect(design.signature).toMatchObject({ signerName: 'Sam Stat', signerEmail: DEMO.statistician, meaning: expect.stringMatching(/^I approve this design/), contentHash: expect.stringMatching(/^[0-9a-f]{64}$/) });
    const row = await stack.db('signatures').where({ id: design.signature.id }).first();
    const authentication = await stack.db('signing_authentications').where({ id: row.signing_authentication_id }).first();
    expect(authentication).toMatchObject({ intent_type: 'design', intent_subject_id: trial.cohortIds[0], consumed_at: expect.any(Date) });
    expect(row.authenticated_at).toEqual(authentication.authenticated_at);

    await stack.db('users').where({ email: DEMO.statistician }).update({ name: 'Samantha Stat-Renamed' });
    try {
      const read = await sam.get(`/api/trials/${trial.trialId}/designs`);
      expect(read.body.cohorts[0].versions[0].signature.signerName).toBe('Sam Stat');
    } finally {
      await stack.db('users').where({ email: DEMO.statistician }).update({ name: 'Sam Stat' });
    }
  });
});

describe('what the database refuses', () => {
  it('when anyone, the owner included, updates or deletes a signature, a design version or a recommendation, then the database refuses', async () => {
    const { trial, cut, cutId } = await interimCut();
    await recommendDirectly(stack.db, cut, DEMO.monitor, 'continue');
    const design = await stack.db('design_versions').where({ cohort_id: trial.cohortIds[0] }).first();
    const attempts: Array<[string, () => Promise<unknown>]> = [
      ['update signature', () => stack.db('signatures').where({ id: design.signature_id }).update({ meaning: 'something else' })],
      ['delete signature', () => stack.db('signatures').where({ id: design.signature_id }).delete()],
      ['truncate signatures', () => stack.db.raw('truncate signatures cascade')],
      ['update design version', () => stack.db('design_versions').where({ id: design.id }).update({ r: 1 })],
      ['delete design version', () => stack.db('design_versions').where({ id: design.id }).delete()],
      ['update recommendation', () => stack.db('recommendations').where({ data_cut_id: cutId }).update({ decision: 'stop_futility' })],
      ['delete recommendation', () => stack.db('recommendations').where({ data_cut_id: cutId }).delete()],
      ['truncate recommendations', () => stack.db.raw('truncate recommendations cascade')],
    ];
    for (const [label, attempt] of attempts) await expect(attempt(), label).rejects.toThrow(/append-only|not allowed/);
    expect(await stack.db('recommendations').where({ data_cut_id: cutId }).first()).toMatchObject({ decision: 'continue' });
  });

  it('when a second signature would rest on an authentication already consumed, or a consumed one is changed, then the database refuses', async () => {
    const trial = await createTrial(stack.db);
    const sam = await stack.signIn(DEMO.statistician);
    await sam.confirmToSign('design', trial.cohortIds[0]);
    const { design } = (await sam.post(lockPath(trial), lockBody())).body;
    const first = await stack.db('signatures').where({ id: design.signature.id }).first();
    const { id: _id, signed_at: _at, ...copy } = first;
    await expect(stack.db('signatures').insert({ ...copy, meaning: 'A second signature on the same password entry' })).rejects.toThrow(/unique|duplicate/);
    await expect(stack.db('signing_authentications').where({ id: first.signing_authentication_id }).update({ consumed_at: null })).rejects.toThrow(/consumed once/);
    await expect(stack.db('signing_authentications').where({ id: first.signing_authentication_id }).delete()).rejects.toThrow(/not allowed/);
    await expect(
      stack.db('signatures').insert({ ...copy, signing_authentication_id: null, meaning: 'A signature without a password entry' }),
    ).rejects.toThrow(/signing authentication|signatures_authentication/);
  });
});

describe('what the identity provider must say', () => {
  it('when the provider sends no auth_time, then the password entry is refused and nothing can be signed', async () => {
    const quirky = await startStackOn(await createTestDatabase(), {}, { idp: { omitAuthTime: true } });
    try {
      const trial = await createTrial(quirky.db);
      const sam = await quirky.signIn(DEMO.statistician);
      const landed = await sam.confirmToSign('design', trial.cohortIds[0]);
      expect(new URL(landed).searchParams.get('signInError')).toBe('no-auth-time');
      expect(await quirky.db('signing_authentications').first()).toBeUndefined();
      const refused = await sam.post(`/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}/design`, lockBody());
      expect(refused.status).toBe(401);
      expect(await quirky.db('design_versions').first()).toBeUndefined();
    } finally {
      await quirky.close();
    }
  }, 60_000);

  it('when the provider reports a password entered before the request (an old login reused despite prompt=login), then the entry is refused', async () => {
    const reusing = await startStackOn(await createTestDatabase(), {}, { idp: { authTimeEarlierBySeconds: 600 } });
    try {
      const trial = await createTrial(reusing.db);
      const sam = await reusing.signIn(DEMO.statistician);
      const landed = await sam.confirmToSign('design', trial.cohortIds[0]);
      expect(new URL(landed).searchParams.get('signInError')).toBe('not-fresh');
      expect(await reusing.db('signing_authentications').first()).toBeUndefined();
      expect((await sam.post(`/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}/design`, lockBody())).status).toBe(401);
    } finally {
      await reusing.close();
    }
  }, 60_000);

  it('when the password entry is older than the time a signature may wait, then it has expired and a new one is needed', async () => {
    const brief = await startStack({ SIGNATURE_FRESHNESS_SECONDS: '1' });
    try {
      const trial = await createTrial(brief.db);
      const sam = await brief.signIn(DEMO.statistician);
      await sam.confirmToSign('design', trial.cohortIds[0]);
      await new Promise((resolve) => setTimeout(resolve, 1_500));
      expect((await sam.post(`/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}/design`, lockBody())).status).toBe(401);
      await sam.confirmToSign('design', trial.cohortIds[0]);
      expect((await sam.post(`/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}/design`, lockBody())).status).toBe(201);
    } finally {
      await brief.close();
    }
  }, 60_000);

  it('when the provider has not verified the e-mail address, then sign-in is refused and no account is made', async () => {
    const uma = await stack.signIn('uma.unverified@tessaly.test');
    expect((await uma.get('/api/me')).status).toBe(401);
    expect(await stack.db('users').where({ email: 'uma.unverified@tessaly.test' }).first()).toBeUndefined();
  });

  it('when the intent named for a password entry is malformed, then 400 names the field', async () => {
    const mona = await stack.signIn(DEMO.monitor);
    const unknown = await mona.get('/auth/login?intent=approve&subject=00000000-0000-4000-8000-000000000000');
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fields.intent).toBeTruthy();
    const noSubject = await mona.get('/auth/login?intent=design&subject=x');
    expect(noSubject.status).toBe(400);
    expect(noSubject.body.error.fields.subject).toBeTruthy();
  });
});
