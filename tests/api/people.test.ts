import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, countRows, createTrial, type TrialFixture } from '../support/factories.js';
import { auditCount, createPendingMembership, createSite, enrolPatient, uniqueSiteCode } from '../support/people-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let admin: Session;
let statistician: Session;
let coordinator: Session;
let investigator: Session;
let monitor: Session;
let sponsor: Session;
let outsider: Session;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  [admin, statistician, coordinator, investigator, monitor, sponsor, outsider] = await Promise.all([
    stack.signIn(DEMO.admin),
    stack.signIn(DEMO.statistician),
    stack.signIn(DEMO.coordinator),
    stack.signIn(DEMO.investigator),
    stack.signIn(DEMO.monitor),
    stack.signIn(DEMO.sponsor),
    stack.signIn('nina.newcomer@tessaly.test'),
  ]);
}, 120_000);
afterAll(async () => stack?.close());

const memberships = (trialId = trial.trialId) => `/api/trials/${trialId}/memberships`;
const auditOf = (entityType: string, entityId: string) => stack.db('audit_log').where({ entity_type: entityType, entity_id: entityId }).orderBy('id');

describe('sites', () => {
  it('when any signed-in user lists sites, then every site is there', async () => {
    const site = await createSite(stack.db);
    const response = await coordinator.get('/api/sites');
    expect(response.status).toBe(200);
    expect(response.body.sites).toContainEqual(expect.objectContaining({ id: site.id, code: site.code, version: 1, trialCount: 0 }));
  });

  it('when an admin creates and edits a site, then both are saved and audited', async () => {
    const code = uniqueSiteCode();
    const created = await admin.post('/api/sites', { code, name: 'Westmoor Infirmary', country: 'Testland' });
    expect(created.status).toBe(201);
    expect(created.body.site).toMatchObject({ code, name: 'Westmoor Infirmary', version: 1 });
    const edited = await admin.patch(`/api/sites/${created.body.site.id}`, { code, name: 'Westmoor Royal Infirmary', country: 'Testland', version: 1 });
    expect(edited.status).toBe(200);
    expect(edited.body.site).toMatchObject({ name: 'Westmoor Royal Infirmary', version: 2 });
    const audit = await auditOf('site', created.body.site.id);
    expect(audit.map((r) => r.action)).toEqual(['created', 'updated']);
    expect(audit[1]).toMatchObject({ before: expect.objectContaining({ name: 'Westmoor Infirmary' }), after: expect.objectContaining({ name: 'Westmoor Royal Infirmary' }) });
  });

  it('when the site code is already used, then 409 with a clear message and nothing is written', async () => {
    const existing = await createSite(stack.db);
    const before = { sites: await countRows(stack.db, 'sites'), audit: await auditCount(stack.db) };
    const response = await admin.post('/api/sites', { code: existing.code, name: 'Copy', country: 'Testland' });
    expect(response.status).toBe(409);
    expect(response.body.error.message).toBe(`A site with code ${existing.code} already exists. Site codes start study IDs, so each must be unique.`);
    expect(response.body.error.fields).toEqual({ code: expect.any(String) });
    const other = await createSite(stack.db);
    expect((await admin.patch(`/api/sites/${other.id}`, { code: existing.code, name: 'x', country: 'y', version: 1 })).status).toBe(409);
    expect({ sites: await countRows(stack.db, 'sites'), audit: await auditCount(stack.db) }).toEqual({ sites: before.sites + 1, audit: before.audit });
  });

  it('when the code breaks the study-ID prefix format, then 400 on each bad field and nothing is written', async () => {
    const before = await countRows(stack.db, 'sites');
    for (const code of ['a1', 'TOOLONGCODE', 'R-G', 'X']) {
      const response = await admin.post('/api/sites', { code, name: '', country: 'Testland' });
      expect(response.status).toBe(400);
      expect(Object.keys(response.body.error.fields).sort()).toEqual(['code', 'name']);
    }
    expect(await countRows(stack.db, 'sites')).toBe(before);
  });

  it('when the version is stale, then 409 with the current site', async () => {
    const site = await createSite(stack.db);
    expect((await admin.patch(`/api/sites/${site.id}`, { code: site.code, name: 'First', country: 'Testland', version: 1 })).status).toBe(200);
    const stale = await admin.patch(`/api/sites/${site.id}`, { code: site.code, name: 'Second', country: 'Testland', version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: site.id, name: 'First', version: 2 });
  });

  it('when patients are enrolled at a site, then its code can no longer change but its name can', async () => {
    const fixture = await createTrial(stack.db, { sites: [uniqueSiteCode()] });
    const [code, siteId] = Object.entries(fixture.siteIds)[0];
    await enrolPatient(stack.db, fixture, siteId);
    const recoded = await admin.patch(`/api/sites/${siteId}`, { code: uniqueSiteCode(), name: 'x', country: 'Testland', version: 1 });
    expect(recoded.status).toBe(409);
    expect(recoded.body.error.fields).toEqual({ code: expect.any(String) });
    expect((await admin.patch(`/api/sites/${siteId}`, { code, name: 'Renamed', country: 'Testland', version: 1 })).status).toBe(200);
  });

  it.each([
    ['statistician', () => statistician],
    ['coordinator', () => coordinator],
    ['investigator', () => investigator],
    ['monitor', () => monitor],
    ['sponsor', () => sponsor],
    ['non-member', () => outsider],
  ])('when a %s tries to create or edit a site, then 403 and nothing is written', async (_who, session) => {
    const site = await createSite(stack.db);
    const before = { sites: await countRows(stack.db, 'sites'), audit: await auditCount(stack.db) };
    expect((await session().post('/api/sites', { code: uniqueSiteCode(), name: 'x', country: 'y' })).status).toBe(403);
    expect((await session().patch(`/api/sites/${site.id}`, { code: site.code, name: 'x', country: 'y', version: 1 })).status).toBe(403);
    expect({ sites: await countRows(stack.db, 'sites'), audit: await auditCount(stack.db) }).toEqual(before);
  });
});

describe('memberships', () => {
  it('when the admin invites someone who has signed in before, then the membership is active at once and audited', async () => {
    const hal = await stack.signIn('hal.coord@tessaly.test');
    const response = await admin.post(memberships(), { email: 'Hal.Coord@tessaly.test', role: 'coordinator', siteId: trial.siteIds.SA });
    expect(response.status).toBe(201);
    expect(response.body.membership).toMatchObject({ email: 'hal.coord@tessaly.test', role: 'coordinator', status: 'active', siteCode: 'SA' });
    expect((await hal.get(`/api/trials/${trial.trialId}`)).status).toBe(200);
    const [row] = await auditOf('membership', response.body.membership.id);
    expect(row).toMatchObject({ action: 'invited', after: { email: 'hal.coord@tessaly.test', role: 'coordinator', siteCode: 'SA', status: 'active' } });
  });

  it('when the admin invites someone new, then the membership is pending until their first sign-in', async () => {
    const fixture = await createTrial(stack.db);
    const response = await admin.post(memberships(fixture.trialId), { email: 'lena.stat@tessaly.test', role: 'statistician' });
    expect(response.status).toBe(201);
    expect(response.body.membership.status).toBe('pending');
    const listed = await admin.get(memberships(fixture.trialId));
    expect(listed.body.memberships).toContainEqual(expect.objectContaining({ email: 'lena.stat@tessaly.test', status: 'pending' }));
    const lena = await stack.signIn('lena.stat@tessaly.test');
    expect((await lena.get(`/api/trials/${fixture.trialId}`)).status).toBe(200);
    expect((await stack.db('memberships').where({ id: response.body.membership.id }).first()).status).toBe('active');
  });

  it('when the statistician lists memberships, then they see them; site roles, monitors and sponsors get 403', async () => {
    expect((await statistician.get(memberships())).status).toBe(200);
    for (const session of [coordinator, investigator, monitor, sponsor]) expect((await session.get(memberships())).status).toBe(403);
  });

  it('when the site rules are broken, then 400 names the field and nothing is written', async () => {
    const other = await createSite(stack.db);
    const before = { memberships: await countRows(stack.db, 'memberships'), audit: await auditCount(stack.db), mail: await countRows(stack.db, 'mail_outbox') };
    const cases = [
      [{ email: 'x@tessaly.test', role: 'coordinator' }, 'siteId'],
      [{ email: 'x@tessaly.test', role: 'monitor', siteId: trial.siteIds.SA }, 'siteId'],
      [{ email: 'x@tessaly.test', role: 'investigator', siteId: other.id }, 'siteId'],
      [{ email: 'not-an-address', role: 'sponsor' }, 'email'],
      [{ email: 'x@tessaly.test', role: 'owner' }, 'role'],
    ] as const;
    for (const [body, field] of cases) {
      const response = await admin.post(memberships(), body);
      expect(response.status, JSON.stringify(body)).toBe(400);
      expect(Object.keys(response.body.error.fields)).toEqual([field]);
    }
    expect({ memberships: await countRows(stack.db, 'memberships'), audit: await auditCount(stack.db), mail: await countRows(stack.db, 'mail_outbox') }).toEqual(before);
  });

  it('when the person already holds that role, then 409 and no second invitation is queued', async () => {
    const before = await countRows(stack.db, 'mail_outbox');
    const response = await admin.post(memberships(), { email: DEMO.monitor, role: 'monitor' });
    expect(response.status).toBe(409);
    expect(await countRows(stack.db, 'mail_outbox')).toBe(before);
  });

  it('when the admin changes a role and site, then it is saved and audited; a stale version gets 409 with the current membership', async () => {
    const pending = await createPendingMembership(stack.db, trial.trialId);
    const changed = await admin.patch(`${memberships()}/${pending.id}`, { role: 'investigator', siteId: trial.siteIds.SB, version: 1 });
    expect(changed.status).toBe(200);
    expect(changed.body.membership).toMatchObject({ role: 'investigator', siteCode: 'SB', version: 2 });
    const [row] = await auditOf('membership', pending.id);
    expect(row).toMatchObject({ action: 'updated', before: expect.objectContaining({ role: 'monitor' }), after: expect.objectContaining({ role: 'investigator' }) });
    const stale = await admin.patch(`${memberships()}/${pending.id}`, { role: 'sponsor', version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: pending.id, role: 'investigator', version: 2 });
  });

  it('when the admin removes a membership, then it is gone and the audit keeps what it was', async () => {
    const pending = await createPendingMembership(stack.db, trial.trialId, { role: 'sponsor' });
    const response = await admin.delete(`${memberships()}/${pending.id}`);
    expect(response.status).toBe(204);
    expect(await stack.db('memberships').where({ id: pending.id }).first()).toBeUndefined();
    const [row] = await auditOf('membership', pending.id);
    expect(row).toMatchObject({ action: 'removed', before: expect.objectContaining({ role: 'sponsor', email: pending.email }) });
  });

  it('when the admin removes or demotes their own membership, then 403 with the reason and nothing changes; another admin may', async () => {
    const fixture = await createTrial(stack.db);
    const own = await stack.db('memberships').where({ trial_id: fixture.trialId, role: 'admin' }).first();
    const auditBefore = await auditCount(stack.db);
    const removal = await admin.delete(`${memberships(fixture.trialId)}/${own.id}`);
    expect(removal.status).toBe(403);
    expect(removal.body.error.message).toMatch(/own membership/);
    const demotion = await admin.patch(`${memberships(fixture.trialId)}/${own.id}`, { role: 'sponsor', version: 1 });
    expect(demotion.status).toBe(403);
    expect(await auditCount(stack.db)).toBe(auditBefore);
    expect(await stack.db('memberships').where({ id: own.id }).first()).toMatchObject({ role: 'admin', version: 1 });

    const second = await admin.post(memberships(fixture.trialId), { email: DEMO.statistician, role: 'admin' });
    expect(second.body.membership.status).toBe('active');
    expect((await statistician.delete(`${memberships(fixture.trialId)}/${own.id}`)).status).toBe(204);
  });

  it('when an unknown or malformed membership id is used, then 404', async () => {
    expect((await admin.delete(`${memberships()}/00000000-0000-4000-8000-000000000000`)).status).toBe(404);
    expect((await admin.patch(`${memberships()}/not-an-id`, { role: 'sponsor', version: 1 })).status).toBe(404);
  });

  it('when a membership of another trial is addressed through this trial, then 404', async () => {
    const other = await createTrial(stack.db);
    const foreign = await createPendingMembership(stack.db, other.trialId);
    expect((await admin.delete(`${memberships()}/${foreign.id}`)).status).toBe(404);
    expect(await stack.db('memberships').where({ id: foreign.id }).first()).toBeDefined();
  });

  it.each([
    ['statistician', () => statistician],
    ['coordinator', () => coordinator],
    ['investigator', () => investigator],
    ['monitor', () => monitor],
    ['sponsor', () => sponsor],
  ])('when a %s tries to invite, change or remove a member, then 403 and nothing is written', async (_who, session) => {
    const pending = await createPendingMembership(stack.db, trial.trialId);
    const before = { memberships: await countRows(stack.db, 'memberships'), audit: await auditCount(stack.db) };
    expect((await session().post(memberships(), { email: 'z@tessaly.test', role: 'sponsor' })).status).toBe(403);
    expect((await session().patch(`${memberships()}/${pending.id}`, { role: 'sponsor', version: 1 })).status).toBe(403);
    expect((await session().delete(`${memberships()}/${pending.id}`)).status).toBe(403);
    expect({ memberships: await countRows(stack.db, 'memberships'), audit: await auditCount(stack.db) }).toEqual(before);
  });

  it('when someone who is not a member of the trial tries any membership route, then 404', async () => {
    const pending = await createPendingMembership(stack.db, trial.trialId);
    expect((await outsider.get(memberships())).status).toBe(404);
    expect((await outsider.post(memberships(), { email: 'z@tessaly.test', role: 'sponsor' })).status).toBe(404);
    expect((await outsider.patch(`${memberships()}/${pending.id}`, { role: 'sponsor', version: 1 })).status).toBe(404);
    expect((await outsider.delete(`${memberships()}/${pending.id}`)).status).toBe(404);
  });
});
