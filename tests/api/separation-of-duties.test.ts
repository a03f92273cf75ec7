/**
 * Separation of duties over HTTP on the real stack: nobody grants, changes or removes their own
 * membership or role; a grant of statistician or committee member is mailed to the trial's
 * statisticians; changes to the shared sites appear in an audit view for trial managers; the
 * first trial manager of an empty installation comes from a documented, audited command.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import { createTestDatabase, eventually, startStack, startStackOn, type Stack } from '../support/stack.js';
import { DEMO, addMember, createTrial } from '../support/factories.js';
import { auditCount, trialBody, uniqueSiteCode } from '../support/people-factories.js';
import type { Session } from '../support/sign-in.js';
import { ROLE_WORDS } from '../../server/words/index.js';

let stack: Stack;
let ada: Session;

beforeAll(async () => {
  stack = await startStack();
  ada = await stack.signIn(DEMO.admin);
}, 120_000);
afterAll(async () => stack?.close());

const memberships = (trialId: string) => `/api/trials/${trialId}/memberships`;

describe('nobody changes their own membership', () => {
  it('when the trial manager invites their own e-mail (in any case), changes their own role or removes their own membership, then 403 says why and nothing is written', async () => {
    const trial = await createTrial(stack.db);
    const own = await stack.db('memberships').where({ trial_id: trial.trialId, role: 'admin' }).first();
    const before = await auditCount(stack.db);
    for (const email of [DEMO.admin, DEMO.admin.toUpperCase()]) {
      const invite = await ada.post(memberships(trial.trialId), { email, role: 'statistician' });
      expect(invite.status).toBe(403);
      expect(invite.body.error.message).toMatch(/own membership or role/);
    }
    const change = await ada.patch(`${memberships(trial.trialId)}/${own.id}`, { role: 'statistician', version: own.version });
    expect(change.status).toBe(403);
    const removal = await ada.delete(`${memberships(trial.trialId)}/${own.id}`);
    expect(removal.status).toBe(403);
    expect(await auditCount(stack.db)).toBe(before);
    expect(await stack.db('memberships').where({ trial_id: trial.trialId, email: DEMO.admin })).toHaveLength(1);
    expect(stack.catcher.messages.filter((m) => m.to.includes(DEMO.admin) && m.subject.includes(trial.code))).toEqual([]);
  });

  it('when a second trial manager makes the first a statistician, then that is allowed: the grant comes from someone else', async () => {
    const trial = await createTrial(stack.db, { members: [{ email: DEMO.admin, role: 'admin' }, { email: 'lena.stat@tessaly.test', role: 'statistician' }] });
    await addMember(stack.db, trial.trialId, { email: 'hal.coord@tessaly.test', role: 'admin' });
    const hal = await stack.signIn('hal.coord@tessaly.test');
    const granted = await hal.post(memberships(trial.trialId), { email: DEMO.admin, role: 'statistician' });
    expect(granted.status).toBe(201);
  });
});

describe('grants that unblind', () => {
  it('when someone is made statistician or committee member, by invitation or by a change of role, then the trial’s statisticians are told by e-mail', async () => {
    const trial = await createTrial(stack.db, {
      members: [
        { email: DEMO.admin, role: 'admin' },
        { email: DEMO.statistician, role: 'statistician' },
        { email: 'lena.stat@tessaly.test', role: 'statistician' },
        { email: DEMO.sponsor, role: 'sponsor' },
      ],
    });
    const invited = await ada.post(memberships(trial.trialId), { email: 'mika.monitor@tessaly.test', role: 'monitor' });
    expect(invited.status).toBe(201);
    const toStatisticians = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject === `${trial.code}: mika.monitor@tessaly.test now holds the role ${ROLE_WORDS.monitor}`);
      return got.length >= 2 && got;
    });
    expect(toStatisticians.flatMap((m) => m.to).sort()).toEqual(['lena.stat@tessaly.test', DEMO.statistician].sort());
    expect(toStatisticians[0].text).toContain(`${DEMO.admin} added mika.monitor@tessaly.test on ${trial.code}`);

    const sponsor = await stack.db('memberships').where({ trial_id: trial.trialId, role: 'sponsor' }).first();
    const promoted = await ada.patch(`${memberships(trial.trialId)}/${sponsor.id}`, { role: 'statistician', version: sponsor.version });
    expect(promoted.status).toBe(200);
    const promotion = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject === `${trial.code}: ${DEMO.sponsor} now holds the role ${ROLE_WORDS.statistician}`);
      return got.length >= 2 && got;
    });
    expect(promotion.flatMap((m) => m.to).sort()).toEqual(['lena.stat@tessaly.test', DEMO.statistician].sort());
  });

  it('when someone is made coordinator, then no statistician is mailed', async () => {
    const trial = await createTrial(stack.db);
    const invited = await ada.post(memberships(trial.trialId), { email: 'hal.coord@tessaly.test', role: 'coordinator', siteId: trial.siteIds.SA });
    expect(invited.status).toBe(201);
    await eventually(() => stack.catcher.messages.some((m) => m.to.includes('hal.coord@tessaly.test') && m.subject.includes(trial.code)));
    expect(await stack.db('mail_outbox').where({ kind: 'unblinded_role_granted' }).whereLike('subject', `${trial.code}:%`).first()).toBeUndefined();
  });
});

describe('changes to the shared sites', () => {
  it('when a site is created and renamed, then a trial manager sees both changes in the sites audit view; other roles may not open it', async () => {
    const code = uniqueSiteCode();
    const created = await ada.post('/api/sites', { code, name: 'Audit View Hospital', country: 'Testland' });
    expect(created.status).toBe(201);
    const renamed = await ada.patch(`/api/sites/${created.body.site.id}`, { code, name: 'Audit View Hospital (renamed)', country: 'Testland', version: 1 });
    expect(renamed.status).toBe(200);

    const view = await ada.get(`/api/audit/sites?entityId=${created.body.site.id}`);
    expect(view.status).toBe(200);
    expect(view.body.entries.map((e: { action: string; actorEmail: string }) => [e.action, e.actorEmail])).toEqual([
      ['updated', DEMO.admin],
      ['created', DEMO.admin],
    ]);
    expect(view.body.entries[0]).toMatchObject({ before: { name: 'Audit View Hospital' }, after: { name: 'Audit View Hospital (renamed)' } });
    expect(view.body.entityTypes).toEqual(['site']);
    for (const email of [DEMO.statistician, DEMO.coordinator, DEMO.sponsor]) {
      expect((await (await stack.signIn(email)).get('/api/audit/sites')).status).toBe(403);
    }
  });
});

describe('the first trial manager of an empty installation', () => {
  const run = promisify(execFile);
  const command = (databaseUrl: string, email: string) =>
    run(process.execPath, ['--import', 'tsx', 'server/people/grant-first-manager.ts', email], { env: { ...process.env, DATABASE_URL: databaseUrl } });

  it('when the documented command names someone, then they may create sites and trials from their first sign-in, the grant is audited, and the command refuses a second time', async () => {
    const empty = await createTestDatabase();
    const done = await command(empty.runtimeUrl, 'Nina.Newcomer@tessaly.test');
    expect(done.stdout).toMatch(/may create sites and trials from their first sign-in/);
    await expect(command(empty.runtimeUrl, 'hal.coord@tessaly.test')).rejects.toMatchObject({ code: 1, stderr: expect.stringMatching(/already manages trials/) });

    const installation = await startStackOn(empty);
    try {
      const [grant] = await installation.db('trial_manager_grants');
      expect(grant).toMatchObject({ email: 'nina.newcomer@tessaly.test', user_id: null, granted_from: expect.stringMatching(/^command line, by /) });
      expect(await installation.db('audit_log').where({ entity_type: 'trial_manager_grant', action: 'granted' })).toHaveLength(1);

      const nina = await installation.signIn('nina.newcomer@tessaly.test');
      expect((await nina.get('/api/me')).body).toMatchObject({ trialManager: true, memberships: [] });
      const site = await nina.post('/api/sites', { code: 'FST', name: 'First Site Hospital', country: 'Testland' });
      expect(site.status).toBe(201);
      const trial = await nina.post('/api/trials', trialBody({ sites: [{ siteId: site.body.site.id }] }));
      expect(trial.status, trial.text).toBe(201);
      expect(await installation.db('audit_log').where({ entity_type: 'trial_manager_grant', action: 'activated' })).toHaveLength(1);
      const hal = await installation.signIn('hal.coord@tessaly.test');
      expect((await hal.post('/api/sites', { code: 'HAL', name: 'Not allowed', country: 'Testland' })).status).toBe(403);
    } finally {
      await installation.close();
    }
  }, 90_000);
});
