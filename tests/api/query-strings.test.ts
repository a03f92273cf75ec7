/**
 * The query string of every route: a parameter given twice, or as a list or object, is refused
 * with 400 naming it, once for all routes (the security suite fuzzes every GET route's query
 * string beside this).
 */
import { connect } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { arrangeCohort, freezeCutDirectly, outcomes } from '../support/data-cut-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let cutId: string;
let sam: Session;
let cora: Session;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  await arrangeCohort(stack.db, trial, { patients: { SA: outcomes(2, 3) } });
  cutId = (await freezeCutDirectly(stack.db, trial)).id;
  [sam, cora] = await Promise.all([stack.signIn(DEMO.statistician), stack.signIn(DEMO.coordinator)]);
}, 120_000);
afterAll(async () => stack?.close());

describe('repeated, list and object query parameters', () => {
  it('when the patient list gets ?q=a&q=b, then 400 names q (it used to answer 500)', async () => {
    const response = await cora.get(`/api/trials/${trial.trialId}/patients?q=a&q=b`);
    expect(response.status).toBe(400);
    expect(response.body.error).toMatchObject({ code: 'invalid_input', fields: { q: expect.stringMatching(/"q" appears 2 times/) } });
    expect((await cora.get(`/api/trials/${trial.trialId}/patients?q=a`)).status).toBe(200);
  });

  it('when other routes get a key twice, then each answers 400 naming it', async () => {
    const cases: Array<[Session, string, string]> = [
      [sam, `/api/trials/${trial.trialId}/audit?entityType=patient&entityType=site`, 'entityType'],
      [sam, `/api/portfolio?status=draft&status=completed`, 'status'],
      [sam, `/api/data-cuts/${cutId}/analysis?a=1&b=1&a=2`, 'a'],
      [sam, `/api/data-cuts/${cutId}/export.csv?dataset=adrs&dataset=patients`, 'dataset'],
      [sam, `/api/trials/${trial.trialId}/evaluation?x=1&x=2`, 'x'],
    ];
    for (const [session, path, key] of cases) {
      const response = await session.get(path);
      expect(response.status, path).toBe(400);
      expect(Object.keys(response.body.error.fields), path).toEqual([key]);
    }
    const login = await request(stack.url).get('/auth/login?returnTo=/a&returnTo=/b');
    expect(login.status).toBe(400);
    expect(login.body.error.fields.returnTo).toBeTruthy();
  });

  it('when a parameter is written as a list or an object, then 400 names it', async () => {
    for (const query of ['q[]=a', 'q[]=a&q[]=b', 'q[x]=a', 'q[x][y]=a']) {
      const response = await cora.get(`/api/trials/${trial.trialId}/patients?${query}`);
      expect(response.status, query).toBe(400);
      expect(Object.keys(response.body.error.fields), query).toEqual(['q']);
    }
  });

  it('when a write route gets a repeated key, then 400 and nothing is written', async () => {
    const before = await stack.db('audit_log').count({ n: '*' }).first();
    const response = await cora
      .post(`/api/trials/${trial.trialId}/patients/import?dryRun=true&dryRun=false`)
      .attach('file', Buffer.from('study_id\n'), { filename: 'x.csv', contentType: 'text/csv' });
    expect(response.status).toBe(400);
    expect(response.body.error.fields.dryRun).toBeTruthy();
    expect(await stack.db('audit_log').count({ n: '*' }).first()).toEqual(before);
  });

  it('when a page or offset is too large for the database to skip to, then 400 names it (it used to answer 500)', async () => {
    const audit = await sam.get(`/api/trials/${trial.trialId}/audit?offset=9223372036854776000`);
    expect(audit.status).toBe(400);
    expect(Object.keys(audit.body.error.fields)).toEqual(['offset']);
    const patients = await cora.get(`/api/trials/${trial.trialId}/patients?page=9223372036854776000`);
    expect(patients.status).toBe(400);
    expect(Object.keys(patients.body.error.fields)).toEqual(['page']);
  });

  it('when a query value, a body field or a path id carries a NUL character, then 400 names it and nothing is written (?q=%00 used to answer 500)', async () => {
    for (const path of [`/api/trials/${trial.trialId}/patients?q=%00`, `/api/trials/${trial.trialId}/patients?q=a%00b`, `/api/trials/${trial.trialId}/adverse-events?q=%00`]) {
      const response = await cora.get(path);
      expect(response.status, path).toBe(400);
      expect(response.body.error.fields, path).toEqual({ q: expect.stringMatching(/NUL character/) });
    }
    const audit = await sam.get(`/api/trials/${trial.trialId}/audit?entityType=%00`);
    expect(audit.status).toBe(400);
    expect(Object.keys(audit.body.error.fields)).toEqual(['entityType']);

    const before = await stack.db('patients').count({ n: '*' }).first();
    const enrol = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-\u0000777', siteId: trial.siteIds.SA, enrolledOn: '2026-11-02' });
    expect(enrol.status).toBe(400);
    expect(enrol.body.error.fields).toEqual({ studyId: expect.stringMatching(/NUL character/) });
    expect(await stack.db('patients').count({ n: '*' }).first()).toEqual(before);

    const badId = await cora.get('/api/trials/%00/patients');
    expect(badId.status).toBeGreaterThanOrEqual(400);
    expect(badId.status).toBeLessThan(500);
  });
});

describe('requests the HTTP parser refuses before any route', () => {
  it('when the address is over the 16 KB limit (a long query string), then 431 names the query string in our error shape, and the server goes on answering', async () => {
    const response = await fetch(`${stack.url}/api/trials/${trial.trialId}/patients?q=${'a'.repeat(20_000)}`, { headers: { cookie: cora.cookie } });
    expect(response.status).toBe(431);
    expect(response.headers.get('content-type')).toBe('application/json; charset=utf-8');
    const body = (await response.json()) as { error: { code: string; message: string; fields: Record<string, string> } };
    expect(body.error).toMatchObject({ code: 'too_large', fields: { query: expect.stringMatching(/query string/) } });
    expect(body.error.message).toMatch(/Shorten the query string/);
    expect((await cora.get(`/api/trials/${trial.trialId}/patients?q=a`)).status).toBe(200);
  });

  it('when the address of a write is too long, then 431 and nothing is written', async () => {
    const before = await stack.db('audit_log').count({ c: '*' });
    const response = await fetch(`${stack.url}/api/trials/${trial.trialId}/patients?x=${'b'.repeat(20_000)}`, {
      method: 'POST',
      headers: { cookie: cora.cookie, origin: new URL(stack.url).origin, 'content-type': 'application/json' },
      body: JSON.stringify({ studyId: 'SA-901', siteId: trial.siteIds.SA, enrolledOn: '2026-01-05' }),
    });
    expect(response.status).toBe(431);
    expect(Number((await stack.db('patients').where({ trial_id: trial.trialId, study_id: 'SA-901' }).count({ c: '*' }))[0].c)).toBe(0);
    expect(await stack.db('audit_log').count({ c: '*' })).toEqual(before);
  });

  it('when the headers are over the limit (an oversized cookie), then 431 names the headers', async () => {
    const response = await fetch(`${stack.url}/api/health`, { headers: { cookie: `big=${'c'.repeat(20_000)}` } });
    expect(response.status).toBe(431);
    const body = (await response.json()) as { error: { code: string; fields: Record<string, string> } };
    expect(body.error).toMatchObject({ code: 'too_large', fields: { headers: expect.stringMatching(/headers/) } });
  });

  it('when the request line is not HTTP, then 400 in our error shape', async () => {
    const { port } = new URL(stack.url);
    const answer = await new Promise<string>((resolve, reject) => {
      const socket = connect(Number(port), '127.0.0.1', () => socket.write('NOT A REQUEST\r\n\r\n'));
      let text = '';
      socket.on('data', (chunk) => (text += String(chunk)));
      socket.on('end', () => resolve(text));
      socket.on('error', reject);
    });
    expect(answer).toMatch(/^HTTP\/1\.1 400 Bad Request\r\n/);
    expect(JSON.parse(answer.slice(answer.indexOf('\r\n\r\n') + 4))).toEqual({ error: { code: 'bad_request', message: 'The request is not valid HTTP.' } });
  });
});
