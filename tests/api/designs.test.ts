import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly } from '../support/patient-factories.js';
import { TSY201_SETTINGS, lockBody, writeCounts } from '../support/design-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let sam: Session;

beforeAll(async () => {
  stack = await startStack();
  sam = await stack.signIn(DEMO.statistician);
}, 120_000);
afterAll(async () => stack?.close());

const candidatesPath = (t: TrialFixture) => `/api/trials/${t.trialId}/design-candidates`;
const lockPath = (t: TrialFixture, cohort = 0) => `/api/trials/${t.trialId}/cohorts/${t.cohortIds[cohort]}/design`;
const amendPath = (t: TrialFixture, cohort = 0) => `${lockPath(t, cohort)}/amendments`;
const transitionPath = (t: TrialFixture, cohort = 0) => `/api/trials/${t.trialId}/cohorts/${t.cohortIds[cohort]}/transitions`;

/** Enters the password for this cohort's design, then signs it, as the sign dialog does. */
async function signLock(session: Session, t: TrialFixture, body: Record<string, unknown>, cohort = 0) {
  await session.confirmToSign('design', t.cohortIds[cohort]);
  return session.post(lockPath(t, cohort), body);
}
async function signAmendment(session: Session, t: TrialFixture, body: Record<string, unknown>, cohort = 0) {
  await session.confirmToSign('amendment', t.cohortIds[cohort]);
  return session.post(amendPath(t, cohort), body);
}

type Candidate = { r1: number | null; n1: number | null; r: number; n: number; en0: number; pet0: number; typeIError: number; power: number; curve: Array<{ p: number; probPromising: number }> };
const rule = (d: Candidate) => `${d.r1}/${d.n1}, ${d.r}/${d.n}`;

describe('design candidates', () => {
  it("when the statistician asks for TSY-201's settings, then Simon's optimal and minimax designs come back", async () => {
    const trial = await createTrial(stack.db);
    const response = await sam.post(candidatesPath(trial), TSY201_SETTINGS);
    expect(response.status).toBe(200);
    const { optimal, minimax } = response.body as { optimal: Candidate; minimax: Candidate };
    // Simon (1989), Controlled Clinical Trials 10:1–10, Table 1 (values recalled from memory):
    // p0 0.20, p1 0.40, α 0.05, β 0.20 → optimal 3/13, 12/43, EN0 20.6, PET0 0.75; minimax 4/18, 10/33, EN0 22.3, PET0 0.72.
    expect(rule(optimal)).toBe('3/13, 12/43');
    expect(optimal.en0).toBeCloseTo(20.6, 1);
    expect(optimal.pet0).toBeCloseTo(0.75, 2);
    expect(rule(minimax)).toBe('4/18, 10/33');
    expect(minimax.en0).toBeCloseTo(22.3, 1);
    expect(minimax.pet0).toBeCloseTo(0.72, 2);
  });

  it("when the statistician asks for TSY-202's settings, then Simon's designs for p0 0.10, p1 0.30 come back", async () => {
    const trial = await createTrial(stack.db);
    const response = await sam.post(candidatesPath(trial), { p0: 0.1, p1: 0.3, alpha: 0.05, beta: 0.2, nmax: 60 });
    expect(response.status).toBe(200);
    // Simon (1989), Table 1 (values recalled from memory): optimal 1/10, 5/29, EN0 15.0, PET0 0.74; minimax 1/15, 5/25, EN0 19.5, PET0 0.55.
    expect(rule(response.body.optimal)).toBe('1/10, 5/29');
    expect(response.body.optimal.en0).toBeCloseTo(15.0, 1);
    expect(response.body.optimal.pet0).toBeCloseTo(0.74, 2);
    expect(rule(response.body.minimax)).toBe('1/15, 5/25');
    expect(response.body.minimax.en0).toBeCloseTo(19.5, 1);
    expect(response.body.minimax.pet0).toBeCloseTo(0.55, 2);
  });

  it('when candidates come back, then every one meets α and power and its curve passes through p0 and p1', async () => {
    const trial = await createTrial(stack.db);
    const { body } = await sam.post(candidatesPath(trial), TSY201_SETTINGS);
    const all: Candidate[] = [body.singleStage, body.optimal, body.minimax, ...body.admissible];
    expect(body.admissible.length).toBeGreaterThanOrEqual(2);
    expect(body.singleStage.r1).toBeNull();
    for (const design of all) {
      expect(design.typeIError).toBeLessThanOrEqual(0.05);
      expect(design.power).toBeGreaterThanOrEqual(0.8);
      const atP0 = design.curve.find((point) => point.p === 0.2);
      const atP1 = design.curve.find((point) => point.p === 0.4);
      expect(atP0?.probPromising).toBeCloseTo(design.typeIError, 10);
      expect(atP1?.probPromising).toBeCloseTo(design.power, 10);
    }
    // Admissible designs (Jung et al. 2004) run from the optimal (q = 0) to the minimax design (q = 1).
    expect(body.admissible[0].sameAs).toBe('optimal');
    expect(body.admissible[body.admissible.length - 1].sameAs).toBe('minimax');
    expect(body.admissible[0].qFrom).toBe(0);
    expect(body.admissible[body.admissible.length - 1].qTo).toBe(1);
  });

  it.each([
    ['p1 not above p0', { p1: 0.2 }, 'p1'],
    ['p0 outside (0, 1)', { p0: 1.2 }, 'p0'],
    ['α + β not below 1', { alpha: 0.6, beta: 0.5 }, 'beta'],
    ['nmax above the bound', { nmax: 500 }, 'nmax'],
    ['nmax not whole', { nmax: 40.5 }, 'nmax'],
    ['α missing', { alpha: undefined }, 'alpha'],
  ])('when %s, then 400 names the field', async (_label, change, field) => {
    const trial = await createTrial(stack.db);
    const response = await sam.post(candidatesPath(trial), { ...TSY201_SETTINGS, ...change });
    expect(response.status).toBe(400);
    expect(response.body.error.fields[field]).toEqual(expect.any(String));
  });

  it('when no design of at most nmax patients can reach the power, then 400 on nmax explains why', async () => {
    const trial = await createTrial(stack.db);
    const before = await writeCounts(stack.db);
    const response = await sam.post(candidatesPath(trial), { ...TSY201_SETTINGS, nmax: 20 });
    expect(response.status).toBe(400);
    expect(response.body.error.fields.nmax).toMatch(/No design with at most 20 patients/);
    expect(await writeCounts(stack.db)).toEqual(before);
  });

  it('when a long search runs, then the server still answers other requests meanwhile', async () => {
    const trial = await createTrial(stack.db);
    // p0 0.5, p1 0.6 with nmax 200: among the slowest searches the bounds allow. Three of them queue
    // in the worker one after another, so the last ends well after a request sent meanwhile would,
    // unless the searches held the server's own thread.
    const searches = [0.2, 0.19, 0.18].map((beta) =>
      sam.post(candidatesPath(trial), { p0: 0.5, p1: 0.6, alpha: 0.05, beta, nmax: 200 }).then((r) => ({ r, at: Date.now() })),
    );
    await new Promise((resolve) => setTimeout(resolve, 10));
    const health = await sam.get('/api/health').then((r) => ({ r, at: Date.now() }));
    const done = await Promise.all(searches);
    for (const search of done) expect(search.r.status).toBe(200);
    expect(health.r.status).toBe(200);
    expect(health.at).toBeLessThan(Math.max(...done.map((search) => search.at)));
  });
});

describe('locking a design (electronic signature)', () => {
  it('when no password was entered for this design, then 401 names the way to enter it and nothing is written; after it the lock is signed with the printed name', async () => {
    const trial = await createTrial(stack.db);
    const stat = await stack.signIn(DEMO.statistician);
    const before = await writeCounts(stack.db);
    const unconfirmed = await stat.post(lockPath(trial), lockBody());
    expect(unconfirmed.status).toBe(401);
    expect(unconfirmed.body.error.code).toBe('reauthentication_required');
    expect(unconfirmed.body.error.reauthUrl).toBe(`/auth/login?intent=design&subject=${trial.cohortIds[0]}`);
    expect(await writeCounts(stack.db)).toEqual(before);

    const confirmedAt = Date.now();
    await stat.confirmToSign('design', trial.cohortIds[0]);
    const locked = await stat.post(lockPath(trial), lockBody({ r1: 0, n1: 1, r: 0, n: 2 }));
    expect(locked.status).toBe(201);
    const design = locked.body.design;
    // The numbers come from the server's own search, never from the request.
    expect(`${design.r1}/${design.n1}, ${design.r}/${design.n}`).toBe('3/13, 12/43');
    expect(design.version).toBe(1);
    expect(design.signature).toMatchObject({
      signerEmail: DEMO.statistician,
      signerName: 'Sam Stat',
      subjectType: 'design',
      subjectId: design.id,
      meaning: `I approve this design for protocol PRT-TEST v1.0 of ${trial.code}, cohort MAIN.`,
    });
    // auth_time has whole seconds: the password was entered at or after the request for it.
    expect(new Date(design.signature.authenticatedAt).getTime()).toBeGreaterThanOrEqual(Math.floor(confirmedAt / 1000) * 1000);
    const audit = await stack.db('audit_log').where({ entity_type: 'design', entity_id: design.id });
    expect(audit).toEqual([expect.objectContaining({ action: 'design_locked', trial_id: trial.trialId })]);
  });

  it('when the design is read back, then statistician, admin and monitor see the version with its signature', async () => {
    const trial = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    expect((await signLock(sam, trial, lockBody({ selection: 'minimax' }), 1)).status).toBe(201);
    for (const email of [DEMO.statistician, DEMO.admin, DEMO.monitor]) {
      const reader = email === DEMO.statistician ? sam : await stack.signIn(email);
      const response = await reader.get(`/api/trials/${trial.trialId}/designs`);
      expect(response.status).toBe(200);
      const [a, b] = response.body.cohorts;
      expect(a.code).toBe('A');
      expect(a.versions).toEqual([]);
      expect(b.versions).toHaveLength(1);
      expect(b.versions[0]).toMatchObject({ selection: 'minimax', r1: 4, n1: 18, r: 10, n: 33, signature: { signerEmail: DEMO.statistician, signerName: expect.any(String) } });
      expect(b.currentCurve.length).toBeGreaterThan(10);
    }
  });

  it('when a second version is signed before any enrolment, then it needs a reason', async () => {
    const trial = await createTrial(stack.db);
    expect((await signLock(sam, trial, lockBody())).status).toBe(201);
    const before = await writeCounts(stack.db);
    const noReason = await sam.post(lockPath(trial), lockBody({ selection: 'minimax' }));
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/reason/);
    expect(await writeCounts(stack.db)).toEqual(before);
    const revised = await signLock(sam, trial, lockBody({ selection: 'minimax', reason: 'Smaller maximum size preferred by the steering committee', basedOnVersion: 1 }));
    expect(revised.status).toBe(201);
    expect(revised.body.design).toMatchObject({ version: 2, amendmentReason: 'Smaller maximum size preferred by the steering committee' });
    expect(revised.body.design.signature.meaning).toMatch(/^I approve version 2 of this design/);
    const audit = await stack.db('audit_log').where({ entity_id: revised.body.design.id }).first();
    expect(audit).toMatchObject({ action: 'design_revised', reason: 'Smaller maximum size preferred by the steering committee' });
  });

  it('when the signer saw an older version, then 409 with the current design and nothing is written', async () => {
    const trial = await createTrial(stack.db);
    expect((await signLock(sam, trial, lockBody())).status).toBe(201);
    const before = await writeCounts(stack.db);
    const stale = await sam.post(lockPath(trial), lockBody({ reason: 'Change', basedOnVersion: 0 }));
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ version: 1 });
    expect(await writeCounts(stack.db)).toEqual(before);
  });

  it('when an admissible design is chosen by a position that does not exist, then 400 on admissibleIndex', async () => {
    const trial = await createTrial(stack.db);
    const response = await sam.post(lockPath(trial), lockBody({ selection: 'admissible', admissibleIndex: 40 }));
    expect(response.status).toBe(400);
    expect(response.body.error.fields.admissibleIndex).toMatch(/admissible designs/);
    const chosen = await signLock(sam, trial, lockBody({ selection: 'admissible', admissibleIndex: 1 }));
    expect(chosen.status).toBe(201);
    expect(chosen.body.design.selection).toBe('admissible');
  });

  it('when the meaning is not confirmed or the protocol reference is missing, then 400 and nothing is written', async () => {
    const trial = await createTrial(stack.db);
    const before = await writeCounts(stack.db);
    const response = await sam.post(lockPath(trial), lockBody({ confirmMeaning: false, protocolReference: '' }));
    expect(response.status).toBe(400);
    expect(Object.keys(response.body.error.fields).sort()).toEqual(['confirmMeaning', 'protocolReference']);
    expect(await writeCounts(stack.db)).toEqual(before);
  });
});

describe('amendments after the first enrolment', () => {
  async function enrolledTrial() {
    const trial = await createTrial(stack.db);
    expect((await signLock(sam, trial, lockBody())).status).toBe(201);
    await sam.post(transitionPath(trial), { to: 'enrolling_stage_1' }).expect(200);
    await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, count: 3 });
    return trial;
  }

  it('when patients are enrolled, then the lock route refuses and points to an amendment', async () => {
    const trial = await enrolledTrial();
    const response = await sam.post(lockPath(trial), lockBody({ reason: 'Change' }));
    expect(response.status).toBe(409);
    expect(response.body.error.message).toMatch(/amendment/);
  });

  it('when an amendment has no reason, then 400 and nothing is written', async () => {
    const trial = await enrolledTrial();
    const before = await writeCounts(stack.db);
    for (const reason of [undefined, '', '   ']) {
      const response = await sam.post(amendPath(trial), lockBody({ selection: 'minimax', reason }));
      expect(response.status).toBe(400);
      expect(response.body.error.fields.reason).toBe('An amendment needs a reason.');
    }
    expect(await writeCounts(stack.db)).toEqual(before);
  });

  it('when an amendment is signed with a reason, then it is a new signed version and the old one stays readable', async () => {
    const trial = await enrolledTrial();
    const response = await signAmendment(sam, trial, lockBody({ selection: 'minimax', reason: 'Protocol amendment 2: smaller maximum size', basedOnVersion: 1 }));
    expect(response.status).toBe(201);
    expect(response.body.design).toMatchObject({ version: 2, selection: 'minimax', amendmentReason: 'Protocol amendment 2: smaller maximum size' });
    expect(response.body.design.signature).toMatchObject({ subjectType: 'amendment', meaning: expect.stringMatching(/^I approve this amendment \(design version 2\)/) });
    const audit = await stack.db('audit_log').where({ entity_id: response.body.design.id }).first();
    expect(audit).toMatchObject({ action: 'design_amended', reason: 'Protocol amendment 2: smaller maximum size' });
    const read = await sam.get(`/api/trials/${trial.trialId}/designs`);
    expect(read.body.cohorts[0].versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);
    expect(read.body.cohorts[0].versions[1]).toMatchObject({ r1: 3, n1: 13, signature: { subjectType: 'design' } });
    expect(read.body.cohorts[0].enrolled).toBe(3);
  });

  it('when no patient is enrolled yet, then the amendment route refuses (a new version goes through the lock form)', async () => {
    const trial = await createTrial(stack.db);
    expect((await signLock(sam, trial, lockBody())).status).toBe(201);
    const response = await sam.post(amendPath(trial), lockBody({ reason: 'Early change' }));
    expect(response.status).toBe(409);
  });
});

describe('opening accrual and stopping a cohort', () => {
  it('when no design is locked, then opening accrual is refused with a clear message and nothing changes', async () => {
    const trial = await createTrial(stack.db);
    const before = await writeCounts(stack.db);
    const response = await sam.post(transitionPath(trial), { to: 'enrolling_stage_1' });
    expect(response.status).toBe(409);
    expect(response.body.error.message).toMatch(/no locked design/);
    expect(await writeCounts(stack.db)).toEqual(before);
    expect((await stack.db('cohorts').where({ id: trial.cohortIds[0] }).first()).status).toBe('draft');
  });

  it('when a design is locked, then the statistician opens accrual, audited; the admin may not', async () => {
    const trial = await createTrial(stack.db);
    expect((await signLock(sam, trial, lockBody())).status).toBe(201);
    const ada = await stack.signIn(DEMO.admin);
    const refused = await ada.post(transitionPath(trial), { to: 'enrolling_stage_1' });
    expect(refused.status).toBe(403);
    const opened = await sam.post(transitionPath(trial), { to: 'enrolling_stage_1', from: 'draft' });
    expect(opened.status).toBe(200);
    expect(opened.body.cohort.status).toBe('enrolling_stage_1');
    const audit = await stack.db('audit_log').where({ entity_type: 'cohort', entity_id: trial.cohortIds[0] });
    expect(audit).toEqual([expect.objectContaining({ action: 'status_changed', after: { status: 'enrolling_stage_1', stopCategory: null } })]);
    const again = await sam.post(transitionPath(trial), { to: 'enrolling_stage_1', from: 'draft' });
    expect(again.status).toBe(409);
  });

  it('when a move belongs to another page, then 409 says where it happens', async () => {
    const trial = await createTrial(stack.db);
    const interim = await sam.post(transitionPath(trial), { to: 'interim_review' });
    expect(interim.status).toBe(409);
    expect(interim.body.error.message).toMatch(/Patients page/);
    const stage2 = await sam.post(transitionPath(trial), { to: 'enrolling_stage_2' });
    expect(stage2.status).toBe(409);
    expect(stage2.body.error.message).toMatch(/Data cut/);
  });

  it('when the admin stops a cohort for a sponsor decision, then it stops with category and reason; futility is the statistician’s', async () => {
    const trial = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    const ada = await stack.signIn(DEMO.admin);
    const noReason = await ada.post(transitionPath(trial), { to: 'stopped', stopCategory: 'sponsor' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toEqual(expect.any(String));
    const futility = await ada.post(transitionPath(trial), { to: 'stopped', stopCategory: 'futility', reason: 'Too few responders' });
    expect(futility.status).toBe(403);
    const stopped = await ada.post(transitionPath(trial), { to: 'stopped', stopCategory: 'sponsor', reason: 'Portfolio reprioritised by the sponsor' });
    expect(stopped.status).toBe(200);
    expect(stopped.body.cohort).toMatchObject({ status: 'stopped', stopCategory: 'sponsor', stopReason: 'Portfolio reprioritised by the sponsor' });
    const byStat = await sam.post(transitionPath(trial, 1), { to: 'stopped', stopCategory: 'futility', reason: 'Stage-1 futility rule met' });
    expect(byStat.status).toBe(200);
    const lockStopped = await sam.post(lockPath(trial), lockBody());
    expect(lockStopped.status).toBe(409);
  });
});

describe('who reaches the design routes', () => {
  it('when a coordinator, investigator or sponsor calls any design route, then 403; a non-member gets 404', async () => {
    const trial = await createTrial(stack.db);
    const calls = (s: Session) => [
      s.post(candidatesPath(trial), TSY201_SETTINGS),
      s.get(`/api/trials/${trial.trialId}/designs`),
      s.post(lockPath(trial), lockBody()),
      s.post(amendPath(trial), lockBody({ reason: 'x' })),
      s.post(transitionPath(trial), { to: 'enrolling_stage_1' }),
    ];
    for (const email of [DEMO.coordinator, DEMO.investigator, DEMO.sponsor]) {
      const session = await stack.signIn(email);
      for (const response of await Promise.all(calls(session))) expect(response.status).toBe(403);
    }
    const outsider = await stack.signIn('nina.newcomer@tessaly.test');
    for (const response of await Promise.all(calls(outsider))) expect(response.status).toBe(404);
  });

  it('when the monitor or admin reads, then they may; they cannot compute or sign', async () => {
    const trial = await createTrial(stack.db);
    for (const email of [DEMO.monitor, DEMO.admin]) {
      const session = await stack.signIn(email);
      expect((await session.get(`/api/trials/${trial.trialId}/designs`)).status).toBe(200);
      expect((await session.post(candidatesPath(trial), TSY201_SETTINGS)).status).toBe(403);
      expect((await session.post(lockPath(trial), lockBody())).status).toBe(403);
    }
  });

  it('when the cohort belongs to another trial, then 404', async () => {
    const trial = await createTrial(stack.db);
    const other = await createTrial(stack.db);
    const response = await sam.post(`/api/trials/${trial.trialId}/cohorts/${other.cohortIds[0]}/design`, lockBody());
    expect(response.status).toBe(404);
    const notUuid = await sam.post(`/api/trials/${trial.trialId}/cohorts/not-a-cohort/transitions`, { to: 'enrolling_stage_1' });
    expect(notUuid.status).toBe(404);
  });
});
