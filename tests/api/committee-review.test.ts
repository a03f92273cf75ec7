import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, addMember, createTrial, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import { arrangeCohort, freezeCutDirectly, outcomes, recommendDirectly } from '../support/data-cut-factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';

let stack: Stack;
let sam: Session;
let mona: Session;

beforeAll(async () => {
  stack = await startStack();
  sam = await stack.signIn(DEMO.statistician);
  mona = await stack.signIn(DEMO.monitor);
});
afterAll(async () => stack?.close());

/** Stage 1 of Simon's optimal 3/13, 12/43 complete, cohort paused for the interim review. */
async function pausedAtInterim(stage1: { responders: number; nonResponders: number }): Promise<{ trial: TrialFixture; cohortId: string }> {
  const trial = await createTrial(stack.db);
  const { cohortId } = await arrangeCohort(stack.db, trial, {
    design: { cohortStatus: 'interim_review' },
    patients: { SA: outcomes(stage1.responders, stage1.nonResponders) },
  });
  return { trial, cohortId };
}

/** The coordinator enrols at site SA through the API and records each outcome, as a site would. */
async function enrolWithOutcomes(cora: Session, trial: TrialFixture, results: Array<'responder' | 'non_responder'>) {
  for (const [i, outcome] of results.entries()) {
    const enrolledOn = `2026-02-${String(i + 1).padStart(2, '0')}`;
    const enrolled = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: `SA-${String(i + 1).padStart(3, '0')}`, siteId: trial.siteIds.SA, enrolledOn });
    expect(enrolled.status, JSON.stringify(enrolled.body)).toBe(201);
    const recorded = await cora.patch(`/api/trials/${trial.trialId}/patients/${enrolled.body.patient.id}`, {
      version: enrolled.body.patient.version,
      outcome,
      bestOverallResponse: outcome === 'responder' ? 'PR' : 'SD',
      responseAssessedOn: '2026-06-01',
      evaluable: true,
    });
    expect(recorded.status, JSON.stringify(recorded.body)).toBe(200);
  }
}

const continueRecommendation = { decision: 'continue', rationale: 'Four responders among thirteen: stage 1 passed, no safety concern.', analysisVersion: 1 };

/** Enters the password for a recommendation on this cut, then signs it, as the sign form does. */
async function signRecommendation(member: Session, cutId: string, body: Record<string, unknown> = continueRecommendation) {
  await member.confirmToSign('recommendation', cutId);
  return member.post(`/api/data-cuts/${cutId}/recommendations`, body);
}

describe('signing a recommendation', () => {
  it('when a monitor signs after entering the password for this cut, then the recommendation is stored with its signature on analysis version 1; a second one is refused with 409', async () => {
    const { trial } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    const cut = await freezeCutDirectly(stack.db, trial);
    const monitor = await stack.signIn(DEMO.monitor);
    const signed = await signRecommendation(monitor, cut.id);
    expect(signed.status).toBe(201);
    expect(signed.body.signed).toBe(1);
    expect(signed.body.committeeSize).toBe(1);
    const [recommendation] = signed.body.recommendations;
    expect(recommendation).toMatchObject({ decision: 'continue', memberEmail: DEMO.monitor, analysisVersion: 1 });
    expect(recommendation.signature.meaning).toBe(`I recommend "Continue to stage 2" for ${trial.code} cohort MAIN on data cut 1 (${cut.id}), having reviewed its analysis version 1.`);
    expect(recommendation.signature.signerName).toBe('Mona Monitor');
    expect(recommendation.signature.subjectType).toBe('recommendation');
    const audit = await stack.db('audit_log').where({ entity_type: 'recommendation', entity_id: recommendation.id, action: 'signed' }).first();
    expect(audit.after.decision).toBe('continue');

    const again = await signRecommendation(monitor, cut.id, { ...continueRecommendation, decision: 'stop_futility' });
    expect(again.status).toBe(409);
    expect(await stack.db('recommendations').where({ data_cut_id: cut.id }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it('when the monitor has not entered the password for this cut, then 401 names the way to enter it and nothing is signed; after entering it the signature goes through', async () => {
    const { trial } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    const cut = await freezeCutDirectly(stack.db, trial);
    const monitor = await stack.signIn(DEMO.monitor);
    const unconfirmed = await monitor.post(`/api/data-cuts/${cut.id}/recommendations`, continueRecommendation);
    expect(unconfirmed.status).toBe(401);
    expect(unconfirmed.body.error.code).toBe('reauthentication_required');
    expect(unconfirmed.body.error.reauthUrl).toBe(`/auth/login?intent=recommendation&subject=${cut.id}`);
    expect(await stack.db('recommendations').where({ data_cut_id: cut.id }).first()).toBeUndefined();
    expect((await signRecommendation(monitor, cut.id)).status).toBe(201);
  });

  it('when the rationale is missing, then 400 with the field, before any signature', async () => {
    const { trial } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    const cut = await freezeCutDirectly(stack.db, trial);
    const bad = await mona.post(`/api/data-cuts/${cut.id}/recommendations`, { decision: 'continue' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.rationale).toBeTruthy();
    const wrong = await mona.post(`/api/data-cuts/${cut.id}/recommendations`, { decision: 'carry on', rationale: 'A long enough rationale.', analysisVersion: 1 });
    expect(wrong.body.error.fields.decision).toBeTruthy();
  });

  it('when several members sign, then the cut shows how many of the committee have signed', async () => {
    const { trial } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    await addMember(stack.db, trial.trialId, { email: 'milo.member@tessaly.test', role: 'monitor' });
    await addMember(stack.db, trial.trialId, { email: 'nora.member@tessaly.test', role: 'monitor' });
    const cut = await freezeCutDirectly(stack.db, trial);
    await recommendDirectly(stack.db, cut, 'milo.member@tessaly.test', 'continue');
    await recommendDirectly(stack.db, cut, 'nora.member@tessaly.test', 'continue');
    const list = await sam.get(`/api/data-cuts/${cut.id}/recommendations`);
    expect(list.body).toMatchObject({ signed: 2, committeeSize: 3 });
    const cuts = await mona.get(`/api/trials/${trial.trialId}/data-cuts`);
    expect(cuts.body.dataCuts[0].recommendationCount).toBe(2);
  });
});

describe('"Continue to stage 2" only where a stage 2 is ahead', () => {
  it('when a cut of a cohort already in stage 2 or of a single-stage cohort is reviewed, then "continue" is refused with 400 on the decision field and nothing is signed', async () => {
    const inStage2 = await createTrial(stack.db);
    await arrangeCohort(stack.db, inStage2, { design: { cohortStatus: 'enrolling_stage_2' }, patients: { SA: outcomes(4, 10) } });
    const singleStage = await createTrial(stack.db);
    await arrangeCohort(stack.db, singleStage, { design: { r1: null, n1: null, r: 5, n: 20, cohortStatus: 'enrolling_stage_1' }, patients: { SA: outcomes(3, 5) } });
    for (const trial of [inStage2, singleStage]) {
      const cut = await freezeCutDirectly(stack.db, trial);
      const refused = await mona.post(`/api/data-cuts/${cut.id}/recommendations`, continueRecommendation);
      expect(refused.status).toBe(400);
      expect(refused.body.error.fields.decision).toMatch(/only where a stage 2 exists and has not begun/);
      expect(await stack.db('recommendations').where({ data_cut_id: cut.id }).count({ n: '*' }).first()).toEqual({ n: 0 });
      expect(await stack.db('signatures').where({ subject_id: cut.id }).count({ n: '*' }).first()).toEqual({ n: 0 });
    }
  });

  it('when resuming stage 2 is applied to a single-stage cohort, then 400 on the action field and the cohort stays as it was', async () => {
    const trial = await createTrial(stack.db);
    const { cohortId } = await arrangeCohort(stack.db, trial, { design: { r1: null, n1: null, r: 5, n: 20, cohortStatus: 'enrolling_stage_1' }, patients: { SA: outcomes(3, 5) } });
    const cut = await freezeCutDirectly(stack.db, trial);
    await recommendDirectly(stack.db, cut, DEMO.monitor, 'modify_protocol');
    const refused = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'resume_stage_2', reason: 'No stage 2 to resume.' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields.action).toMatch(/only where a stage 2 exists and has not begun/);
    expect((await stack.db('cohorts').where({ id: cohortId }).first()).status).toBe('enrolling_stage_1');
    expect(await stack.db('data_cut_decisions').where({ data_cut_id: cut.id }).count({ n: '*' }).first()).toEqual({ n: 0 });
  });
});

describe('who may reach the committee routes', () => {
  it('when a statistician, coordinator, investigator, sponsor or admin tries to sign, then 403; a non-member gets 404 on every route', async () => {
    const { trial } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    const cut = await freezeCutDirectly(stack.db, trial);
    for (const email of [DEMO.statistician, DEMO.coordinator, DEMO.investigator, DEMO.sponsor, DEMO.admin]) {
      const session = await stack.signIn(email);
      expect((await session.post(`/api/data-cuts/${cut.id}/recommendations`, continueRecommendation)).status).toBe(403);
    }
    const routes: Array<[string, string]> = [
      ['get', `/api/data-cuts/${cut.id}`],
      ['get', `/api/data-cuts/${cut.id}/analysis`],
      ['get', `/api/data-cuts/${cut.id}/recommendations`],
      ['post', `/api/data-cuts/${cut.id}/recommendations`],
      ['post', `/api/data-cuts/${cut.id}/decision`],
      ['patch', `/api/data-cuts/${cut.id}/prior`],
      ['get', `/api/data-cuts/${cut.id}/report.pdf`],
      ['get', `/api/data-cuts/${cut.id}/export.csv`],
      ['get', `/api/data-cuts/${cut.id}/adrs.csv`],
    ];
    for (const email of [DEMO.coordinator, DEMO.sponsor]) {
      const session = await stack.signIn(email);
      for (const [method, path] of routes) {
        const response = method === 'get' ? await session.get(path) : await (session[method as 'post' | 'patch'])(path, continueRecommendation);
        expect(response.status, `${email} ${method} ${path}`).toBe(403);
      }
    }
    const outsider = await stack.signIn('nina.newcomer@tessaly.test');
    for (const [method, path] of routes) {
      const response = method === 'get' ? await outsider.get(path) : await (outsider[method as 'post' | 'patch'])(path, continueRecommendation);
      expect(response.status, `outsider ${method} ${path}`).toBe(404);
    }
  });
});

describe('applying the decision', () => {
  it('when no member has signed an interim cut, then the decision is refused with 409 and the cohort stays paused', async () => {
    const { trial, cohortId } = await pausedAtInterim({ responders: 4, nonResponders: 9 });
    const cut = await freezeCutDirectly(stack.db, trial);
    const refused = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'resume_stage_2', reason: 'Stage 1 passed.' });
    expect(refused.status).toBe(409);
    expect((await stack.db('cohorts').where({ id: cohortId }).first()).status).toBe('interim_review');
  });

  it('when stopping without a category, then 400', async () => {
    const { trial } = await pausedAtInterim({ responders: 1, nonResponders: 12 });
    const cut = await freezeCutDirectly(stack.db, trial);
    await recommendDirectly(stack.db, cut, DEMO.monitor, 'stop_futility');
    const bad = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'stop', reason: 'Futility rule met.' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.stopCategory).toBeTruthy();
  });

  it('the interim cycle through the API: n1 enrolled with outcomes → paused → cut → "continue" signed → applied → stage-2 enrolment succeeds, sites and sponsors told', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId });
    const cora = await stack.signIn(DEMO.coordinator);
    await enrolWithOutcomes(cora, trial, [...Array(4).fill('responder'), ...Array(9).fill('non_responder')]);
    expect((await stack.db('cohorts').where({ id: cohortId }).first()).status).toBe('interim_review');
    const paused = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-014', siteId: trial.siteIds.SA, enrolledOn: '2026-03-20' });
    expect(paused.status).toBe(409);

    const frozen = await sam.post(`/api/trials/${trial.trialId}/data-cuts`, { cohortId, kind: 'interim' });
    expect(frozen.status).toBe(201);
    const cutId = frozen.body.id;
    expect(frozen.body.dataCut.counts).toMatchObject({ patients: 13, pending: 0, unattested: 13 });
    const analysis = (await mona.get(`/api/data-cuts/${cutId}/analysis`)).body.analysis;
    expect(analysis.cohorts[0].rule.decision).toBe('continue');
    expect((await signRecommendation(mona, cutId)).status).toBe(201);
    const applied = await sam.post(`/api/data-cuts/${cutId}/decision`, { action: 'resume_stage_2', reason: 'Committee recommends continuing; stage 1 passed.' });
    expect(applied.status).toBe(201);
    expect(applied.body.decision).toMatchObject({ action: 'resume_stage_2', fromStatus: 'interim_review', toStatus: 'enrolling_stage_2' });
    expect((await stack.db('data_cuts').where({ id: cutId }).first()).released_to_sponsor_at).not.toBeNull();
    expect((await sam.post(`/api/data-cuts/${cutId}/decision`, { action: 'resume_stage_2', reason: 'Again.' })).status).toBe(409);

    const resumed = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-014', siteId: trial.siteIds.SA, enrolledOn: '2026-03-20' });
    expect(resumed.status).toBe(201);
    expect(resumed.body.patient.stage).toBe(2);
    const mail = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject.startsWith(`${trial.code} MAIN: resume accrual`));
      return got.length >= 3 && got;
    });
    expect(mail.flatMap((m) => m.to).sort()).toEqual([DEMO.coordinator, DEMO.investigator, DEMO.sponsor].sort());
    expect(mail[0].text).toMatch(/Sites may enrol again/);
    const detail = await mona.get(`/api/data-cuts/${cutId}`);
    expect(detail.body.decisions).toHaveLength(1);
  });

  it('the futility path through the API: "stop for futility" signed → cohort stopped, enrolment refused, e-mails in the catcher', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId });
    const cora = await stack.signIn(DEMO.coordinator);
    await enrolWithOutcomes(cora, trial, [...Array(2).fill('responder'), ...Array(11).fill('non_responder')]);
    const cut = (await sam.post(`/api/trials/${trial.trialId}/data-cuts`, { cohortId, kind: 'interim' })).body.dataCut;
    const analysis = (await mona.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis;
    expect(analysis.cohorts[0].rule.decision).toBe('stop-futility');
    const signed = await signRecommendation(mona, cut.id, {
      decision: 'stop_futility',
      rationale: 'Two responders among thirteen: the futility rule is met.',
      analysisVersion: 1,
    });
    expect(signed.status).toBe(201);
    const applied = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'stop', stopCategory: 'futility', reason: 'Futility rule met at stage 1.' });
    expect(applied.status).toBe(201);
    const cohort = await stack.db('cohorts').where({ id: cohortId }).first();
    expect(cohort).toMatchObject({ status: 'stopped', stop_category: 'futility', stop_reason: 'Futility rule met at stage 1.' });
    const refused = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-014', siteId: trial.siteIds.SA, enrolledOn: '2026-03-20' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/stopped/);
    const mail = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject.startsWith(`${trial.code} MAIN: stop the cohort`));
      return got.length >= 3 && got;
    });
    expect(mail[0].text).toMatch(/Do not enrol further patients/);
    // Queued mail may be retried and arrive after later messages: wait for it rather than assume order.
    const statisticianMail = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.to.includes(DEMO.statistician) && m.subject.includes(`${trial.code}: a committee recommendation`));
      return got.length >= 1 && got;
    });
    expect(statisticianMail.length).toBe(1);
    // The mail words the stop category and carries the caution that a recommendation is not yet a decision.
    expect(statisticianMail[0].text).toContain('"Stop for futility"');
    expect(statisticianMail[0].text).toContain('A signed recommendation is not yet a decision');
    expect(mail[0].text).toContain('is stopped for futility');
    const audit = await stack.db('audit_log').where({ entity_type: 'cohort', entity_id: cohortId, action: 'status_changed' }).orderBy('id', 'desc').first();
    expect(audit.after.status).toBe('stopped');
  });

  it('when a whole-trial cut covers several cohorts, then the decision names the cohort it moves; the admin may not apply it, the statistician does', async () => {
    const trial = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    await arrangeCohort(stack.db, trial, { cohortIndex: 0, design: { cohortStatus: 'interim_review' }, patients: { SA: outcomes(4, 9) } });
    const { cohortId: b } = await arrangeCohort(stack.db, trial, { cohortIndex: 1, design: { cohortStatus: 'interim_review' }, patients: { SA: outcomes(1, 12) } });
    const cut = await freezeCutDirectly(stack.db, trial);
    await recommendDirectly(stack.db, cut, DEMO.monitor, 'stop_futility');
    const vague = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'stop', stopCategory: 'futility', reason: 'Cohort B failed.' });
    expect(vague.status).toBe(400);
    expect(vague.body.error.fields.cohortId).toBeTruthy();
    const ada = await stack.signIn(DEMO.admin);
    const byAdmin = await ada.post(`/api/data-cuts/${cut.id}/decision`, { action: 'stop', cohortId: b, stopCategory: 'futility', reason: 'Cohort B failed.' });
    expect(byAdmin.status).toBe(403);
    expect((await stack.db('cohorts').where({ id: b }).first()).status).toBe('interim_review');
    const applied = await sam.post(`/api/data-cuts/${cut.id}/decision`, { action: 'stop', cohortId: b, stopCategory: 'futility', reason: 'Cohort B failed.' });
    expect(applied.status).toBe(201);
    expect((await stack.db('cohorts').where({ id: b }).first()).status).toBe('stopped');
    expect((await stack.db('cohorts').where({ id: trial.cohortIds[0] }).first()).status).toBe('interim_review');
  });
});
