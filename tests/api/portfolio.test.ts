/**
 * The Portfolio over HTTP: every trial the user belongs to, one row per cohort, with status,
 * progress against n1 and n, the next milestone and the committee's last recommendation — and
 * live response figures kept from sponsors unless the protocol allows them; a released data cut's
 * frozen figures instead, labelled with the cut's date.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, addMember, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectPatient } from '../support/patient-factories.js';
import { PATIENT_LEVEL_KEYS, RESPONSE_KEYS, cutDataDirectly, daysAgo, keysDeep, recommendDirectly, setTrialFields } from '../support/accrual-factories.js';
import { releaseCutDirectly } from '../support/data-cut-factories.js';
import type { Session } from '../support/sign-in.js';

type Row = Record<string, unknown> & { trialId: string; cohortId: string; nextMilestone: { text: string; kind: string } };

let stack: Stack;
let sponsor: Session;
let statistician: Session;
/** Stage 1 of 13, eight enrolled: 3 responders, 2 non-responders, 3 pending. */
let hidden: TrialFixture;
/** The protocol lets the sponsor see response. */
let open: TrialFixture;
/** A committee decision released a data cut of the cohort. */
let released: TrialFixture;

const eight: DirectPatient[] = [
  ...Array.from({ length: 3 }, () => ({ outcome: 'responder' as const })),
  ...Array.from({ length: 2 }, () => ({ outcome: 'non_responder' as const })),
  ...Array.from({ length: 3 }, () => ({ outcome: 'pending' as const })),
];

async function trialWithPatients(options: { sponsorSeesResponse?: boolean; indication?: string } = {}): Promise<TrialFixture> {
  const trial = await createTrial(stack.db);
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], sponsorSeesResponse: options.sponsorSeesResponse });
  await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, patients: eight, firstEnrolledOn: daysAgo(40) });
  if (options.indication) await setTrialFields(stack.db, trial.trialId, { indication: options.indication });
  return trial;
}

async function portfolio(session: Session, query = ''): Promise<Row[]> {
  const res = await session.get(`/api/portfolio${query}`);
  expect(res.status).toBe(200);
  return res.body.portfolio.rows;
}

const rowOf = (rows: Row[], trial: TrialFixture) => rows.find((r) => r.trialId === trial.trialId) as Row;

beforeAll(async () => {
  stack = await startStack();
  hidden = await trialWithPatients({ indication: 'Recurrent ovarian cancer' });
  open = await trialWithPatients({ sponsorSeesResponse: true, indication: 'Soft-tissue sarcoma' });
  released = await trialWithPatients();
  await releaseCutDirectly(stack.db, released);
  sponsor = await stack.signIn(DEMO.sponsor);
  statistician = await stack.signIn(DEMO.statistician);
}, 120_000);
afterAll(async () => stack?.close());

describe('GET /api/portfolio', () => {
  it('when a sponsor reads a trial whose protocol hides response, then no response figure nor patient-level field is anywhere in the JSON', async () => {
    const res = await sponsor.get('/api/portfolio');
    const row = res.body.portfolio.rows.find((r: Row) => r.trialId === hidden.trialId);
    const keys = keysDeep(row);
    expect(RESPONSE_KEYS.filter((k) => keys.has(k))).toEqual([]);
    expect(PATIENT_LEVEL_KEYS.filter((k) => keys.has(k))).toEqual([]);
    expect(PATIENT_LEVEL_KEYS.filter((k) => keysDeep(res.body).has(k))).toEqual([]);
    expect(row).toMatchObject({ enrolled: 8, pendingOutcomes: 3 });
    expect(row).not.toHaveProperty('released');
    expect(row.efficacyHidden).toMatch(/sponsors/);
  });

  it('when site staff read a trial whose protocol hides response, then they get counts without trial-wide response figures', async () => {
    for (const email of [DEMO.coordinator, DEMO.investigator]) {
      const res = await (await stack.signIn(email)).get('/api/portfolio');
      const row = res.body.portfolio.rows.find((r: Row) => r.trialId === hidden.trialId);
      expect(RESPONSE_KEYS.filter((k) => keysDeep(row).has(k))).toEqual([]);
      expect(row).toMatchObject({ enrolled: 8, efficacyHidden: expect.stringMatching(/site staff/) });
      expect(rowOf(res.body.portfolio.rows, open)).toMatchObject({ responders: 3 });
    }
  });

  it('when the protocol lets the sponsor see response, then the sponsor receives the response figures', async () => {
    const row = rowOf(await portfolio(sponsor), open);
    expect(row).toMatchObject({ responders: 3, outcomesKnown: 5, responseRate: 0.6 });
    expect(keysDeep(row).has('efficacyHidden')).toBe(false);
  });

  it('when a committee decision released a data cut of the cohort, then the sponsor receives that cut’s figures under its date, and no live key', async () => {
    const row = rowOf(await portfolio(sponsor), released);
    expect(RESPONSE_KEYS.filter((k) => k in row)).toEqual([]);
    expect(row.released).toMatchObject({ responders: 3, outcomesKnown: 5, responseRate: 0.6, stage1Responders: 3, label: expect.stringMatching(/^as of the data cut of \d{1,2} [A-Z][a-z]+ \d{4}$/) });
  });

  it('when the trial manager reads the portfolio, then no row carries a response figure, live or released', async () => {
    const rows = await portfolio(await stack.signIn(DEMO.admin));
    for (const trial of [hidden, open, released]) {
      const row = rowOf(rows, trial);
      expect([...RESPONSE_KEYS, 'released'].filter((k) => keysDeep(row).has(k))).toEqual([]);
      expect(row.efficacyHidden).toMatch(/operational figures only/);
    }
  });

  it('when the statistician reads the portfolio, then every row carries its response figures', async () => {
    const rows = await portfolio(statistician);
    for (const trial of [hidden, open, released]) expect(rowOf(rows, trial)).toMatchObject({ responders: 3, stage1Responders: 3 });
  });

  it('when a user holds the sponsor role and the statistician role on a trial, then that trial is shown in full (the union of the two)', async () => {
    const trial = await trialWithPatients();
    const both = 'lena.stat@tessaly.test';
    await addMember(stack.db, trial.trialId, { email: both, role: 'sponsor' });
    await addMember(stack.db, trial.trialId, { email: both, role: 'statistician' });
    const session = await stack.signIn(both);
    expect(rowOf(await portfolio(session), trial)).toMatchObject({ responders: 3 });
  });

  it('when a cohort is part-way through stage 1, then progress and the next milestone count the patients still needed', async () => {
    const row = rowOf(await portfolio(statistician), hidden);
    expect(row).toMatchObject({
      status: 'enrolling_stage_1',
      statusWords: 'Enrolling stage 1',
      stage: 1,
      stageWords: 'stage 1',
      counted: 8,
      progress: { n1: { counted: 8, target: 13 }, n: { counted: 8, target: 43 } },
      nextMilestone: { kind: 'stage-1-complete', text: 'stage-1 cohort complete in ~5 patients', patientsToGo: 5 },
    });
  });

  it('when a cohort has no design, then its milestone is the design lock', async () => {
    const trial = await createTrial(stack.db);
    const row = rowOf(await portfolio(statistician), trial);
    expect(row).toMatchObject({ design: null, stage: null, progress: { n1: null, n: null }, nextMilestone: { text: 'awaiting design lock' } });
  });

  it('when a cohort is in its final analysis with outcomes missing, then the milestone says how many', async () => {
    const trial = await createTrial(stack.db);
    await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], r1: null, n1: null, r: 1, n: 4, cohortStatus: 'final_analysis' });
    await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId: trial.cohortIds[0],
      siteId: trial.siteIds.SB,
      patients: [{ outcome: 'responder' }, { outcome: 'non_responder' }, {}, {}],
      firstEnrolledOn: daysAgo(80),
    });
    const row = rowOf(await portfolio(statistician), trial);
    expect(row).toMatchObject({ stageWords: 'single stage', nextMilestone: { text: 'final analysis due: 2 outcomes pending', outcomesPending: 2 } });
  });

  it('when an interim data cut waits for the committee, then the milestone says for how long; once recommended, the recommendation shows with its date', async () => {
    const trial = await trialWithPatients();
    await stack.db('cohorts').where({ id: trial.cohortIds[0] }).update({ status: 'interim_review' });
    const cutAt = new Date(Date.now() - 3 * 86_400_000);
    const cutId = await cutDataDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], cutAt });
    let row = rowOf(await portfolio(statistician), trial);
    expect(row).toMatchObject({
      committeeReviewPendingSince: cutAt.toISOString().slice(0, 10),
      lastRecommendation: null,
      nextMilestone: { kind: 'committee-review', text: 'committee review pending for 3 days' },
    });
    const at = new Date(Date.now() - 86_400_000);
    await recommendDirectly(stack.db, { trialId: trial.trialId, cutId, decision: 'continue', at });
    row = rowOf(await portfolio(statistician), trial);
    expect(row.committeeReviewPendingSince).toBeNull();
    expect(row.lastRecommendation).toEqual({ decision: 'continue', words: 'Continue to stage 2', on: at.toISOString().slice(0, 10) });
    expect(row.nextMilestone.text).toBe('interim analysis due: 3 stage-1 outcomes pending');
  });

  it('when filtered by status or indication, then only matching rows come back, with every indication still offered', async () => {
    const byIndication = await statistician.get('/api/portfolio?indication=sarcoma');
    expect(byIndication.body.portfolio.rows.map((r: Row) => r.trialId)).toEqual([open.trialId]);
    expect(byIndication.body.portfolio.indications).toEqual(expect.arrayContaining(['Recurrent ovarian cancer', 'Soft-tissue sarcoma']));
    const interim = await portfolio(statistician, '?status=interim_review');
    expect(interim.length).toBeGreaterThan(0);
    expect(interim.every((r) => r.status === 'interim_review')).toBe(true);
  });

  it('when the status filter is not a status, then the answer is 400 naming the field', async () => {
    const res = await statistician.get('/api/portfolio?status=finished');
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('status');
  });

  it('when a user belongs to no trial, then the portfolio is empty', async () => {
    const outsider = await stack.signIn('nina.newcomer@tessaly.test');
    expect(await portfolio(outsider)).toEqual([]);
  });

  it('when the portfolio holds more trials and patients, then it is answered with the same number of queries', async () => {
    const queries: string[] = [];
    // The mail worker and the session store poll on their own; count only the request's reads.
    const listen = (q: { sql: string }) => {
      if (!/mail_outbox|session/.test(q.sql)) queries.push(q.sql);
    };
    stack.server.db.on('query', listen);
    await portfolio(sponsor);
    const before = queries.length;
    queries.length = 0;
    for (let i = 0; i < 3; i += 1) await trialWithPatients();
    await portfolio(sponsor);
    stack.server.db.off('query', listen);
    expect(queries.length).toBe(before);
    expect(queries.some((sql) => /group by/i.test(sql))).toBe(true);
    expect(queries.filter((sql) => /from "patients"/i.test(sql) && !/group by/i.test(sql))).toEqual([]);
  });
});
