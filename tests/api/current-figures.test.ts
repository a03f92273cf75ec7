/**
 * What the speed-ups must never cost: figures kept in memory per trial data version are current
 * (a committed write shows in the next read, on this server and on a second process, whatever
 * path wrote it), each viewer still sees only what the visibility rule allows, concurrent writes
 * are all counted, conditional GET answers 304 only for the very same content, and a session
 * written less often still ends everywhere at once.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectPatient } from '../support/patient-factories.js';
import { daysAgo, today } from '../support/accrual-factories.js';
import type { RunningServer } from '../../server/server.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let second: RunningServer;
let statistician: Session;
let coordinator: Session;
let sponsor: Session;

beforeAll(async () => {
  stack = await startStack();
  second = await stack.startSecondServer();
  statistician = await stack.signIn(DEMO.statistician);
  coordinator = await stack.signIn(DEMO.coordinator);
  sponsor = await stack.signIn(DEMO.sponsor);
}, 120_000);
afterAll(async () => stack?.close());

/** Two responders, one non-responder and `pending` patients with no outcome yet, at the coordinator's site. */
async function trialWithPatients(pending = 3): Promise<TrialFixture & { pendingIds: string[] }> {
  const trial = await createTrial(stack.db);
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], r1: null, n1: null, r: 20, n: 60 });
  const patients: DirectPatient[] = [{ outcome: 'responder' }, { outcome: 'responder' }, { outcome: 'non_responder' }, ...Array.from({ length: pending }, () => ({ outcome: 'pending' as const }))];
  const created = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, patients, firstEnrolledOn: daysAgo(60) });
  return { ...trial, pendingIds: created.slice(3).map((p) => p.id) };
}

const get = (base: string, session: Session, path: string) => request(base).get(path).set('Cookie', session.cookie);

/** The figures each page shows the statistician, read from one server. */
async function figures(base: string, trialId: string) {
  const [evaluation, list, accrual, portfolio] = await Promise.all([
    get(base, statistician, `/api/trials/${trialId}/evaluation`),
    get(base, statistician, `/api/trials/${trialId}/patients?page=1&pageSize=50&sort=studyId`),
    get(base, statistician, `/api/trials/${trialId}/accrual`),
    get(base, statistician, '/api/portfolio'),
  ]);
  for (const res of [evaluation, list, accrual, portfolio]) expect(res.status).toBe(200);
  return {
    responders: evaluation.body.cohorts[0].responders as number,
    listed: list.body.patients.length as number,
    listResponders: list.body.counts.responder as number,
    accrualPending: accrual.body.accrual.totals.pendingOutcomes as number,
    portfolioResponders: portfolio.body.portfolio.rows.find((r: { trialId: string }) => r.trialId === trialId).responders as number,
  };
}

/** Records a first outcome (responder) for a patient, through the given server. */
function recordResponder(base: string, trialId: string, patientId: string) {
  return request(base)
    .patch(`/api/trials/${trialId}/patients/${patientId}`)
    .set('Cookie', coordinator.cookie)
    .set('Origin', new URL(base).origin)
    .send({ version: 1, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: today(), evaluable: true });
}

const dataVersion = async (trialId: string) => Number((await stack.db('trial_data_versions').where({ trial_id: trialId }).first('version'))?.version ?? 0);

describe('figures kept per data version stay current', () => {
  it('when an outcome is recorded on one server, then the next read of the evaluation, patient list, Accrual and Portfolio shows it on both servers', async () => {
    const trial = await trialWithPatients();
    const before = await figures(stack.url, trial.trialId);
    expect(await figures(second.url, trial.trialId)).toEqual(before);
    expect(before).toMatchObject({ responders: 2, listed: 6, listResponders: 2, accrualPending: 3, portfolioResponders: 2 });

    expect((await recordResponder(stack.url, trial.trialId, trial.pendingIds[0])).status).toBe(200);
    const after = { ...before, responders: 3, listResponders: 3, accrualPending: 2, portfolioResponders: 3 };
    expect(await figures(stack.url, trial.trialId)).toEqual(after);
    expect(await figures(second.url, trial.trialId)).toEqual(after);

    expect((await recordResponder(second.url, trial.trialId, trial.pendingIds[1])).status).toBe(200);
    expect(await figures(stack.url, trial.trialId)).toEqual({ ...after, responders: 4, listResponders: 4, accrualPending: 1, portfolioResponders: 4 });
  });

  it('when patients are written straight into the database, bypassing the server, then the next read counts them all the same', async () => {
    const trial = await trialWithPatients();
    const before = await figures(stack.url, trial.trialId);
    await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId: trial.siteIds.SA, patients: [{ outcome: 'responder' }], firstEnrolledOn: daysAgo(5) });
    expect(await figures(stack.url, trial.trialId)).toEqual({ ...before, responders: 3, listed: 7, listResponders: 3, portfolioResponders: 3 });
  });

  it('when a transaction rolls back, then the data version stays; when one commits, it moves once however many rows changed', async () => {
    const trial = await trialWithPatients();
    const start = await dataVersion(trial.trialId);
    await stack.db
      .transaction(async (trx) => {
        await trx('patients').where({ trial_id: trial.trialId }).update({ outcome: 'responder' });
        throw new Error('undo');
      })
      .catch(() => undefined);
    expect(await dataVersion(trial.trialId)).toBe(start);
    expect((await figures(stack.url, trial.trialId)).responders).toBe(2);
    await stack.db('patients').where({ trial_id: trial.trialId }).update({ version: stack.db.raw('version') });
    expect(await dataVersion(trial.trialId)).toBe(start + 1);
  });

  it('when twelve outcomes are recorded at once through two servers, then every one is answered, audited and counted', async () => {
    const trial = await trialWithPatients(12);
    await figures(stack.url, trial.trialId);
    const answers = await Promise.all(trial.pendingIds.map((id, i) => recordResponder(i % 2 ? second.url : stack.url, trial.trialId, id)));
    expect(answers.map((a) => a.status)).toEqual(trial.pendingIds.map(() => 200));
    const audited = await stack.db('audit_log').where({ trial_id: trial.trialId, entity_type: 'patient', action: 'outcome_recorded' }).count({ c: '*' });
    expect(Number(audited[0].c)).toBe(12);
    expect(await figures(second.url, trial.trialId)).toMatchObject({ responders: 14, listResponders: 14, accrualPending: 0, portfolioResponders: 14 });
  });
});

describe('the trial records behind the Portfolio and the trial list', () => {
  it("when a trial's title or a cohort's state changes, or a membership ends, then the next Portfolio and trial list say so on both servers", async () => {
    const trial = await trialWithPatients();
    const row = async (base: string) => (await get(base, statistician, '/api/portfolio')).body.portfolio.rows.find((r: { trialId: string }) => r.trialId === trial.trialId);
    const listed = async (base: string, session: Session) => (await get(base, session, '/api/trials')).body.trials.find((t: { id: string }) => t.id === trial.trialId);
    expect(await row(stack.url)).toMatchObject({ trialTitle: `Test trial ${trial.code}`, status: 'enrolling_stage_1' });
    expect(await listed(second.url, sponsor)).toBeTruthy();

    await stack.db('trials').where({ id: trial.trialId }).update({ title: 'Renamed in place' });
    await stack.db('cohorts').where({ id: trial.cohortIds[0] }).update({ status: 'interim_review' });
    for (const base of [stack.url, second.url]) {
      expect(await row(base)).toMatchObject({ trialTitle: 'Renamed in place', status: 'interim_review' });
      expect(await listed(base, statistician)).toMatchObject({ title: 'Renamed in place', status: 'interim_review' });
    }

    const sponsorId = (await stack.db('users').where({ email: DEMO.sponsor }).first('id')).id;
    await stack.db('memberships').where({ trial_id: trial.trialId, user_id: sponsorId }).delete();
    expect(await listed(stack.url, sponsor)).toBeUndefined();
    expect(await listed(second.url, sponsor)).toBeUndefined();
    expect((await get(second.url, sponsor, '/api/portfolio')).body.portfolio.rows.some((r: { trialId: string }) => r.trialId === trial.trialId)).toBe(false);
  });
});

describe('every viewer still sees only what the visibility rule allows', () => {
  it('when the statistician has just read the evaluation, then the sponsor reading it next gets no live response figures; once made statistician, at once they do', async () => {
    const trial = await trialWithPatients();
    expect((await get(stack.url, statistician, `/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0].responders).toBe(2);
    const hidden = await get(stack.url, sponsor, `/api/trials/${trial.trialId}/evaluation`);
    expect(hidden.status).toBe(200);
    expect(hidden.body.cohorts[0]).not.toHaveProperty('responders');
    expect(hidden.body.cohorts[0].efficacyHidden).toBeTruthy();
    const sponsorId = (await stack.db('users').where({ email: DEMO.sponsor }).first('id')).id;
    await stack.db('memberships').where({ trial_id: trial.trialId, user_id: sponsorId }).update({ role: 'statistician' });
    expect((await get(second.url, sponsor, `/api/trials/${trial.trialId}/evaluation`)).body.cohorts[0].responders).toBe(2);
  });
});

describe('conditional GET', () => {
  it('when a read is repeated with its tag, then it is 304; another viewer, or the same after a write, gets the new content and tag', async () => {
    const trial = await trialWithPatients();
    const path = `/api/trials/${trial.trialId}/evaluation`;
    const first = await get(stack.url, statistician, path);
    expect(first.headers['cache-control']).toBe('private, no-cache');
    const tag = first.headers.etag;
    expect(tag).toBeTruthy();
    expect((await get(second.url, statistician, path).set('If-None-Match', tag)).status).toBe(304);
    // The first server answers again from the text it kept: the same tag, so 304.
    const again = await get(stack.url, statistician, path);
    expect(again.headers.etag).toBe(tag);
    expect(again.body).toEqual(first.body);
    expect((await get(stack.url, statistician, path).set('If-None-Match', tag)).status).toBe(304);
    const other = await get(stack.url, sponsor, path).set('If-None-Match', tag);
    expect(other.status).toBe(200);
    expect(other.headers.etag).not.toBe(tag);
    expect((await recordResponder(stack.url, trial.trialId, trial.pendingIds[0])).status).toBe(200);
    const changed = await get(stack.url, statistician, path).set('If-None-Match', tag);
    expect(changed.status).toBe(200);
    expect(changed.headers.etag).not.toBe(tag);
    expect(changed.body.cohorts[0].responders).toBe(3);
  });
});

describe('sessions written less often', () => {
  const sidOf = (session: Session) => {
    const value = decodeURIComponent(session.cookie.slice('orrery.sid='.length));
    return value.slice(2, value.lastIndexOf('.'));
  };
  const storedExpiry = async (sid: string) => (await stack.db('session').where({ sid }).first('expire')).expire as Date;

  it('when a user makes several requests in a minute, then the stored session is left alone; when its expiry is older than that, the next request that reads it in full moves it on', async () => {
    const session = await stack.signIn(DEMO.monitor);
    const sid = sidOf(session);
    const start = await storedExpiry(sid);
    for (let i = 0; i < 5; i += 1) expect((await session.get('/api/me')).status).toBe(200);
    expect(await storedExpiry(sid)).toEqual(start);

    // As if the last write were ten minutes ago.
    await stack.db.raw(
      `update session set expire = expire - interval '10 minutes',
              sess = jsonb_set(sess::jsonb, '{cookie,expires}', to_jsonb(to_char((expire - interval '10 minutes') at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')))::json
        where sid = ?`,
      [sid],
    );
    const aged = await storedExpiry(sid);
    // The first server read this session less than a minute ago and answers from that reading; the second reads it in full.
    expect((await session.get('/api/me')).status).toBe(200);
    expect(await storedExpiry(sid)).toEqual(aged);
    expect((await request(second.url).get('/api/me').set('Cookie', session.cookie)).status).toBe(200);
    const moved = await storedExpiry(sid);
    expect(moved.getTime()).toBeGreaterThan(aged.getTime() + 9 * 60_000);
    const stored = (await stack.db('session').where({ sid }).first('sess')).sess as { userId: string; cookie: { expires: string } };
    expect(stored.userId).toBeTruthy();
    expect(Math.abs(new Date(stored.cookie.expires).getTime() - moved.getTime())).toBeLessThan(1000);
  });

  it('when a user signs out on one server, then their cookie is refused on the other at once', async () => {
    const session = await stack.signIn(DEMO.investigator);
    expect((await request(second.url).get('/api/me').set('Cookie', session.cookie)).status).toBe(200);
    expect((await session.post('/auth/logout')).status).toBe(200);
    expect((await request(second.url).get('/api/me').set('Cookie', session.cookie)).status).toBe(401);
  });

  it('when a user signs out on one server, or their stored session expires, then a write from that cookie is refused on a server that read the session a moment ago, and writes nothing', async () => {
    const trial = await trialWithPatients(2);
    const writeAs = (base: string, session: Session, patientId: string) =>
      request(base)
        .patch(`/api/trials/${trial.trialId}/patients/${patientId}`)
        .set('Cookie', session.cookie)
        .set('Origin', new URL(base).origin)
        .send({ version: 1, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: today(), evaluable: true });
    const untouched = async (patientId: string) => {
      expect(await stack.db('patients').where({ id: patientId }).first('version', 'outcome')).toEqual({ version: 1, outcome: 'pending' });
      expect(Number((await stack.db('audit_log').where({ entity_id: patientId }).count({ n: '*' }).first())?.n)).toBe(0);
    };

    const [signedOut, expired] = [await stack.signIn(DEMO.coordinator), await stack.signIn(DEMO.coordinator)];
    for (const session of [signedOut, expired]) {
      // Both servers have read the session within the minute: a write there takes the user from that reading.
      expect((await get(stack.url, session, '/api/me')).status).toBe(200);
      expect((await get(second.url, session, '/api/me')).status).toBe(200);
    }
    expect((await signedOut.post('/auth/logout')).status).toBe(200);
    expect((await writeAs(second.url, signedOut, trial.pendingIds[0])).status).toBe(401);
    await untouched(trial.pendingIds[0]);

    expect(await stack.db('session').where({ sid: sidOf(expired) }).update({ expire: stack.db.raw("now() - interval '1 second'") })).toBe(1);
    for (const base of [stack.url, second.url]) expect((await writeAs(base, expired, trial.pendingIds[1])).status).toBe(401);
    await untouched(trial.pendingIds[1]);

    // The same write from a live session goes through on either server.
    expect((await writeAs(second.url, coordinator, trial.pendingIds[1])).status).toBe(200);
  });

  it('when a stored session has expired, then its cookie is refused by every server, however often they have read sessions before', async () => {
    const session = await stack.signIn(DEMO.monitor);
    for (let i = 0; i < 3; i += 1) {
      expect((await session.get('/api/me')).status).toBe(200);
      expect((await request(second.url).get('/api/me').set('Cookie', session.cookie)).status).toBe(200);
    }
    const sid = decodeURIComponent(session.cookie.split('=')[1].split(';')[0]).replace(/^s:/, '').split('.')[0];
    expect(await stack.db('session').where({ sid }).update({ expire: stack.db.raw("now() - interval '1 second'") })).toBe(1);
    expect((await session.get('/api/me')).status).toBe(401);
    expect((await request(second.url).get('/api/me').set('Cookie', session.cookie)).status).toBe(401);
  });
});
