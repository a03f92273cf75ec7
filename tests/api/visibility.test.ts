/**
 * The visibility rule over HTTP on the real stack, through one trial's life: site staff read their
 * own sites' counts and no trial-wide efficacy; the interim e-mail with stage-1 responders reaches
 * the statistician and the committee only; a committee decision releases the cut's figures to
 * sponsors and site staff under the cut's date, and later outcomes do not move them (Portfolio,
 * Trial overview, digest); the decision mail reaches sites and sponsors, not the trial manager;
 * the Outbox shows each user their own mail.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, addMember, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectPatient } from '../support/patient-factories.js';
import { recommendDirectly } from '../support/data-cut-factories.js';
import { daysAgo, keysDeep } from '../support/accrual-factories.js';
import type { Session } from '../support/sign-in.js';

const R: DirectPatient = { outcome: 'responder' };
const N: DirectPatient = { outcome: 'non_responder' };
/** Trial-wide efficacy keys of a cohort's evaluation (responders also sit inside the stage tallies). */
const TRIAL_WIDE = ['responders', 'stage1', 'stage2', 'rate', 'test', 'rule', 'earlyDetermination', 'accrual', 'notes', 'path'];
const ROLES = Object.keys(DEMO) as RoleName[];

let stack: Stack;
let trial: TrialFixture;
const s = {} as Record<RoleName, Session>;
let cutId: string;
let cutDay: string;

const evaluation = async (who: Session) => {
  const res = await who.get(`/api/trials/${trial.trialId}/evaluation`);
  expect(res.status).toBe(200);
  return res.body.cohorts[0];
};
const portfolioRow = async (who: Session) => (await who.get('/api/portfolio')).body.portfolio.rows.find((r: { trialId: string }) => r.trialId === trial.trialId);
const mailsAbout = (subject: string) => stack.catcher.messages.filter((m) => m.subject.startsWith(subject));

async function recordResponder(studyId: string) {
  const enrolled = await s.coordinator.post(`/api/trials/${trial.trialId}/patients`, { studyId, siteId: trial.siteIds.SA, enrolledOn: daysAgo(60) });
  expect(enrolled.status).toBe(201);
  const { id, version } = enrolled.body.patient;
  const recorded = await s.coordinator.patch(`/api/trials/${trial.trialId}/patients/${id}`, {
    version,
    outcome: 'responder',
    bestOverallResponse: 'PR',
    responseAssessedOn: daysAgo(2),
    evaluable: true,
  });
  expect(recorded.status).toBe(200);
}

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  // Simon's optimal design for p0 0.20, p1 0.40 (3/13, 12/43); twelve stage-1 patients, five responders.
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
  await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, patients: [R, N, R, N, N, N], firstEnrolledOn: daysAgo(200) });
  await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SB, patients: [R, R, N, N, R, N], firstEnrolledOn: daysAgo(190) });
  for (const role of ROLES) s[role] = await stack.signIn(DEMO[role]);
}, 120_000);
afterAll(async () => stack?.close());

describe('who sees efficacy, through a trial’s life', () => {
  it('when the coordinator and the investigator read the live evaluation, then they get their own site’s counts and no trial-wide responders, rate, interval, p-value, verdict or path', async () => {
    for (const [role, site, responders] of [
      ['coordinator', 'SA', 2],
      ['investigator', 'SB', 3],
    ] as const) {
      const cohort = await evaluation(s[role]);
      expect(TRIAL_WIDE.filter((key) => key in cohort)).toEqual([]);
      const { ownSites, ...rest } = cohort;
      expect([...keysDeep(rest)].filter((key) => ['pValue', 'ci', 'estimate', 'responders', 'decision'].includes(key))).toEqual([]);
      expect(ownSites).toEqual([{ cohortId: trial.cohortIds[0], siteId: trial.siteIds[site], siteCode: site, enrolled: 6, counted: 6, decided: 6, responders, pending: 0 }]);
      expect(cohort).toMatchObject({ enrolled: 12, decided: 12, pending: 0, efficacyHidden: expect.stringMatching(/site staff/) });
    }
    const statistician = await evaluation(s.statistician);
    expect(statistician).toMatchObject({ responders: 5, decided: 12, rate: { estimate: 5 / 12 } });
    expect(statistician).not.toHaveProperty('ownSites');
  });

  it('when the n1-th patient is enrolled, then the interim e-mail with the stage-1 responders reaches the statistician and the committee member only', async () => {
    await recordResponder('SA-013');
    const mails = await eventually(() => (mailsAbout(`${trial.code} MAIN: stage 1 complete`).length >= 2 ? mailsAbout(`${trial.code} MAIN: stage 1 complete`) : undefined));
    expect(mails.flatMap((m) => m.to).sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
    expect(mails[0].text).toMatch(/\d+ responders? among \d+ decided patients?/);
    const queued = await stack.db('mail_outbox').where('subject', 'like', `${trial.code} MAIN: stage 1 complete%`).pluck('to_address');
    expect(queued.sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
  });

  it('when a committee decision is applied on the cut, then site staff and the sponsor are told and the trial manager is not; sponsor and site staff now read the cut’s own figures under its date', async () => {
    const frozen = await s.statistician.post(`/api/trials/${trial.trialId}/data-cuts`, { kind: 'interim', cohortId: trial.cohortIds[0] });
    expect(frozen.status).toBe(201);
    cutId = frozen.body.id;
    cutDay = frozen.body.dataCut.cutAt;
    await recommendDirectly(stack.db, frozen.body.dataCut, DEMO.monitor, 'continue');
    const applied = await s.statistician.post(`/api/data-cuts/${cutId}/decision`, { action: 'resume_stage_2', reason: 'The committee recommends continuing; stage 1 passed.' });
    expect(applied.status).toBe(201);

    const decisionSubject = `${trial.code} MAIN: resume accrual for stage 2`;
    const mails = await eventually(() => (mailsAbout(decisionSubject).length >= 3 ? mailsAbout(decisionSubject) : undefined));
    expect(mails.flatMap((m) => m.to).sort()).toEqual([DEMO.coordinator, DEMO.investigator, DEMO.sponsor].sort());

    // The released figures are the cut's analysis, one computation: equal to what the committee reads.
    const analysis = (await s.statistician.get(`/api/data-cuts/${cutId}/analysis`)).body.analysis.cohorts[0];
    const label = `as of the data cut of ${new Date(cutDay).toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })}`;
    for (const role of ['sponsor', 'coordinator', 'investigator'] as const) {
      const cohort = await evaluation(s[role]);
      expect(TRIAL_WIDE.filter((key) => key in cohort)).toEqual([]);
      expect(cohort.released).toMatchObject({ cutId, label, counts: { responders: 6, decided: 13 } });
      expect(cohort.released.responseRate).toEqual(analysis.responseRate);
      expect(cohort.released.exactTest).toEqual(analysis.exactTest);
      expect(cohort.released.rule).toEqual(analysis.rule);
    }
    expect(await evaluation(s.admin)).not.toHaveProperty('released');
    expect((await portfolioRow(s.sponsor)).released).toMatchObject({ responders: 6, outcomesKnown: 13, label });
  });

  it('when one more responder is recorded after the release, then the statistician’s live figures move and the sponsor’s do not — Portfolio, Trial overview and digest alike', async () => {
    await recordResponder('SA-014');
    expect(await evaluation(s.statistician)).toMatchObject({ responders: 7, decided: 14 });

    const cohort = await evaluation(s.sponsor);
    expect(cohort.released.counts).toMatchObject({ responders: 6, decided: 13 });
    expect(cohort).not.toHaveProperty('responders');
    const row = await portfolioRow(s.sponsor);
    expect(row.released).toMatchObject({ responders: 6, outcomesKnown: 13 });
    expect(row).not.toHaveProperty('responders');

    const preview = (await s.sponsor.get('/api/dev/digest-preview')).body.preview.text as string;
    expect(preview).toMatch(/Response as of the data cut of .+: 6 responders among 13 decided patients/);
    expect(preview).not.toMatch(/7 responders|14 decided patients|Response \(live\)/);

    await stack.server.jobs.runDue(new Date());
    const [digest] = await stack.db('mail_outbox').where({ kind: 'weekly-digest', to_address: DEMO.sponsor }).pluck('body_text');
    expect(digest).toMatch(/6 responders among 13 decided patients/);
    expect(digest).not.toMatch(/7 responders/);
  });

  it('when users open the Outbox, then each sees the mail addressed to them and the trial manager sees every message', async () => {
    await eventually(() => (mailsAbout('Orrery weekly digest').length >= 1 ? true : undefined));
    const received = async (who: Session) => {
      const res = await who.get('/api/dev/outbox');
      expect(res.status).toBe(200);
      return res.body.received as Array<{ to: string[]; subject: string }>;
    };
    for (const role of ['coordinator', 'sponsor', 'statistician'] as const) {
      const mine = await received(s[role]);
      expect(mine.length).toBeGreaterThan(0);
      expect(mine.filter((m) => !m.to.includes(DEMO[role]))).toEqual([]);
    }
    expect((await received(s.coordinator)).some((m) => m.subject.includes('stage 1 complete'))).toBe(false);
    const all = await received(s.admin);
    expect(all.some((m) => m.subject.includes('stage 1 complete'))).toBe(true);
    expect(all.some((m) => m.to.includes(DEMO.sponsor))).toBe(true);
  });

  it('when the audit trail is read, then the release is recorded with its figures for the statistician and left out for the trial manager', async () => {
    const released = (body: { entries: Array<{ action: string; entityId: string }> }) => body.entries.filter((e) => e.action === 'figures_released' && e.entityId === cutId);
    const statistician = (await s.statistician.get(`/api/trials/${trial.trialId}/audit?entityType=data_cut`)).body;
    expect(released(statistician)).toHaveLength(1);
    expect(released(statistician)[0]).toMatchObject({ after: { responders: 6, decided: 13 } });
    const admin = (await s.admin.get(`/api/trials/${trial.trialId}/audit`)).body;
    expect(released(admin)).toEqual([]);
    expect(JSON.stringify(admin.entries)).not.toMatch(/"responders"/);
  });

  it('when a coordinator also holds the sponsor role, then the second role does not widen the patient records to other sites', async () => {
    const both = 'hal.coord@tessaly.test';
    await addMember(stack.db, trial.trialId, { email: both, role: 'coordinator', site: 'SA' }, trial.siteIds);
    await addMember(stack.db, trial.trialId, { email: both, role: 'sponsor' });
    const session = await stack.signIn(both);
    const res = await session.get(`/api/trials/${trial.trialId}/patients?pageSize=100`);
    expect(res.status).toBe(200);
    expect(res.body.patients.length).toBeGreaterThan(0);
    expect(new Set(res.body.patients.map((p: { siteId: string }) => p.siteId))).toEqual(new Set([trial.siteIds.SA]));
    const cohort = await evaluation(session);
    expect(cohort.ownSites.map((site: { siteCode: string }) => site.siteCode)).toEqual(['SA']);
    expect(cohort.released.counts.responders).toBe(6);
  });
});
