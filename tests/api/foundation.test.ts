import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';

let stack: Stack;
let trial: TrialFixture;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
});
afterAll(async () => stack?.close());

describe('health and the error format', () => {
  it('when the database is up, then /api/health says so', async () => {
    const response = await request(stack.url).get('/api/health');
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ status: 'ok', database: 'up' });
  });

  it('when an API route does not exist, then the answer is the one JSON error shape', async () => {
    const response = await request(stack.url).get('/api/no-such-thing');
    expect(response.status).toBe(404);
    expect(response.body).toEqual({ error: { code: 'not_found', message: expect.any(String) } });
  });

  it('when /api/me is called without a session, then 401 in the error shape', async () => {
    const response = await request(stack.url).get('/api/me');
    expect(response.status).toBe(401);
    expect(response.body.error.code).toBe('unauthenticated');
  });

  it('when security headers are read, then a real Content-Security-Policy is present', async () => {
    const response = await request(stack.url).get('/api/health');
    expect(response.headers['content-security-policy']).toContain("default-src 'self'");
    expect(response.headers['content-security-policy']).toContain("script-src 'self'");
    expect(response.headers['x-content-type-options']).toBe('nosniff');
    expect(response.headers['x-powered-by']).toBeUndefined();
  });
});

describe('sign-in through the identity provider', () => {
  it('when a demo account signs in (code flow with PKCE), then /api/me returns them and their memberships only', async () => {
    const cora = await stack.signIn(DEMO.coordinator);
    expect(cora.cookie).toMatch(/^orrery\.sid=/);
    const me = await cora.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(DEMO.coordinator);
    expect(me.body.memberships).toEqual([
      expect.objectContaining({ trialId: trial.trialId, role: 'coordinator', siteCode: 'SA' }),
    ]);
    expect(me.body).toMatchObject({ trialManager: false, signingReady: [] });
  });

  it.each(Object.entries(DEMO))('when %s signs in, then their role comes from the database membership', async (role, email) => {
    const session = await stack.signIn(email);
    const me = await session.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.memberships.map((m: { role: string }) => m.role)).toEqual([role]);
    const trials = await session.get('/api/trials');
    expect(trials.body.trials).toEqual([expect.objectContaining({ id: trial.trialId, code: trial.code })]);
  });

  it('when the password is wrong, then the identity provider refuses and no session is made', async () => {
    await expect(stack.signIn(DEMO.admin).then(() => undefined)).resolves.toBeUndefined();
    const { signIn } = await import('../support/sign-in.js');
    await expect(signIn(stack.url, DEMO.admin, 'wrong')).rejects.toThrow(/refused/);
  });

  it('when the session cookie is issued, then it is HttpOnly and SameSite=Lax', async () => {
    const start = await fetch(`${stack.url}/auth/login`, { redirect: 'manual' });
    const cookie = start.headers.getSetCookie().find((c) => c.startsWith('orrery.sid='));
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
  });

  it('when a user signs out, then the session no longer works', async () => {
    const session = await stack.signIn(DEMO.monitor);
    const out = await session.post('/auth/logout');
    expect(out.status).toBe(200);
    expect(out.body.redirectTo).toContain('/session/end');
    expect((await session.get('/api/me')).status).toBe(401);
  });

  it('when a write comes from another origin, then it is refused', async () => {
    const session = await stack.signIn(DEMO.admin);
    const response = await request(stack.url).post('/auth/logout').set('Cookie', session.cookie).set('Origin', 'http://evil.test');
    expect(response.status).toBe(403);
    expect(response.body.error.code).toBe('bad_origin');
    expect((await session.get('/api/me')).status).toBe(200);
  });

  it('when a user who has never signed in was invited, then the membership activates at first sign-in', async () => {
    await stack.db('memberships').insert({ trial_id: trial.trialId, email: 'nina.newcomer@tessaly.test', role: 'monitor', status: 'pending' });
    const nina = await stack.signIn('nina.newcomer@tessaly.test');
    const me = await nina.get('/api/me');
    expect(me.body.memberships).toEqual([expect.objectContaining({ trialId: trial.trialId, role: 'monitor' })]);
    const audit = await stack.db('audit_log').where({ entity_type: 'membership', action: 'activated' });
    expect(audit).toHaveLength(1);
  });
});

describe('site scoping of membership data', () => {
  it('when a coordinator asks for the trial memberships, then 403; an admin gets them', async () => {
    const cora = await stack.signIn(DEMO.coordinator);
    expect((await cora.get(`/api/trials/${trial.trialId}/memberships`)).status).toBe(403);
    const ada = await stack.signIn(DEMO.admin);
    const list = await ada.get(`/api/trials/${trial.trialId}/memberships`);
    expect(list.status).toBe(200);
    expect(list.body.memberships.length).toBeGreaterThanOrEqual(6);
  });

  it('when someone outside the trial asks for it, then 404 (its existence does not leak)', async () => {
    const other = await createTrial(stack.db, { members: [{ email: DEMO.admin, role: 'admin' }] });
    const cora = await stack.signIn(DEMO.coordinator);
    expect((await cora.get(`/api/trials/${other.trialId}`)).status).toBe(404);
  });
});

describe('audit trail', () => {
  it('when anyone tries to change or delete an audit row, then the database refuses', async () => {
    await stack.db('audit_log').insert({ entity_type: 'test', entity_id: 'x', action: 'created' });
    await expect(stack.db('audit_log').update({ action: 'tampered' })).rejects.toThrow(/append-only/);
    await expect(stack.db('audit_log').del()).rejects.toThrow(/append-only/);
    await expect(stack.db.raw('truncate audit_log')).rejects.toThrow(/append-only/);
  });
});
