/**
 * Two server processes on one database, as behind a load balancer: a session made on either works
 * on the other, queued mail goes out once with both workers running, and a scheduled job's period
 * is claimed by exactly one process.
 */
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { pino } from 'pino';
import { startStack, eventually, type Stack } from '../support/stack.js';
import { signIn } from '../support/sign-in.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import type { RunningServer } from '../../server/server.js';
import { enqueueMail } from '../../server/mail/outbox.js';
import { runDueJobs, type ScheduledJob } from '../../server/jobs/jobs.js';

let stack: Stack;
let second: RunningServer;
let trial: TrialFixture;

beforeAll(async () => {
  stack = await startStack();
  second = await stack.startSecondServer();
  trial = await createTrial(stack.db);
}, 120_000);
afterAll(async () => stack?.close());

const originOf = (url: string) => new URL(url).origin;

describe('two server processes on one database', () => {
  it('when someone signs in on the first server, then their session works on the second, for reads and writes', async () => {
    const admin = await stack.signIn(DEMO.admin);
    const me = await request(second.url).get('/api/me').set('Cookie', admin.cookie);
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(DEMO.admin);
    const site = await request(second.url)
      .post('/api/sites')
      .set('Cookie', admin.cookie)
      .set('Origin', originOf(second.url))
      .send({ code: 'TWO', name: 'Second process site', country: 'Testland' });
    expect(site.status).toBe(201);
  });

  it('when someone signs in on the second server, then their session works on the first', async () => {
    const sam = await signIn(second.url, DEMO.statistician);
    const trialRes = await request(stack.url).get(`/api/trials/${trial.trialId}`).set('Cookie', sam.cookie);
    expect(trialRes.status).toBe(200);
    const out = await request(stack.url).post('/auth/logout').set('Cookie', sam.cookie).set('Origin', originOf(stack.url));
    expect(out.status).toBe(200);
    expect((await request(second.url).get('/api/me').set('Cookie', sam.cookie)).status).toBe(401);
  });

  it('when a session the first server read a moment ago is signed out on the second, then the first refuses it at once on every kind of read', async () => {
    const reads = [
      '/api/me',
      `/api/trials/${trial.trialId}`,
      `/api/trials/${trial.trialId}/evaluation`,
      '/api/portfolio',
      '/api/portfolio?status=nonsense',
      '/api/trials',
      '/api/sites',
      `/api/data-cuts/${randomUUID()}/analysis`,
      '/api/trials/not-a-trial',
    ];
    for (const path of reads) {
      // Each read on a fresh session: a refusal makes the first server forget the session, and the next read would read it in full.
      const sam = await signIn(stack.url, DEMO.statistician);
      const get = () => request(stack.url).get(path).set('Cookie', sam.cookie);
      // The first read reads the session in full; the second is answered from the first server's reading of it.
      expect((await get()).status).not.toBe(401);
      expect((await get()).status).not.toBe(401);
      const out = await request(second.url).post('/auth/logout').set('Cookie', sam.cookie).set('Origin', originOf(second.url));
      expect(out.status).toBe(200);
      expect({ path, status: (await get()).status }).toEqual({ path, status: 401 });
    }
  });

  it('when a session the first server read a moment ago expires in the database, then the first refuses it at once', async () => {
    const sam = await signIn(stack.url, DEMO.statistician);
    const get = (path: string) => request(stack.url).get(path).set('Cookie', sam.cookie);
    expect((await get('/api/me')).status).toBe(200);
    expect((await get(`/api/trials/${trial.trialId}/evaluation`)).status).toBe(200);
    const sid = decodeURIComponent(/orrery\.sid=s%3A([^.;]+)/.exec(sam.cookie)?.[1] ?? '');
    expect(await stack.db('session').where({ sid }).update({ expire: stack.db.raw(`now() - interval '1 second'`) })).toBe(1);
    expect((await get(`/api/trials/${trial.trialId}/evaluation`)).status).toBe(401);
    expect((await get('/api/me')).status).toBe(401);
  });

  it('when mail is queued and both mail workers run, then every message is sent exactly once', async () => {
    const subject = `Two workers ${Date.now()}`;
    const recipients = Array.from({ length: 60 }, (_, i) => `reader${i}@tessaly.test`);
    await enqueueMail(stack.db, recipients.map((to) => ({ kind: 'test', to, subject, text: 'Once only.' })));
    const kicks = setInterval(() => {
      stack.server.mail.kick();
      second.mail.kick();
    }, 20);
    try {
      await eventually(async () => {
        const [{ count }] = await stack.db('mail_outbox').where({ subject }).whereNot({ status: 'sent' }).count({ count: '*' });
        return Number(count) === 0;
      }, 20_000);
    } finally {
      clearInterval(kicks);
    }
    const received = stack.catcher.messages.filter((m) => m.subject === subject).map((m) => m.to[0]);
    expect(received).toHaveLength(recipients.length);
    expect(new Set(received).size).toBe(recipients.length);
  }, 40_000);

  it('when both processes run the scheduled jobs at the same moment, then each period runs once', async () => {
    const runs: string[] = [];
    const job: ScheduledJob = {
      name: `test-job-${Date.now()}`,
      periodOf: (now) => now.toISOString().slice(0, 10),
      run: async (db, { period }) => {
        runs.push(period);
        // Hold the claim a moment so the other process really competes for it.
        await db.raw('select pg_sleep(0.2)');
      },
    };
    const logger = pino({ level: 'silent' });
    const now = new Date('2026-12-07T09:00:00Z');
    const attempts = await Promise.all(
      [stack.server, second, stack.server, second].map((s) => runDueJobs(s.db, stack.config, logger, now, [job])),
    );
    expect(attempts.flat()).toEqual([job.name]);
    expect(runs).toEqual(['2026-12-07']);
    expect(await stack.db('job_runs').where({ job: job.name })).toHaveLength(1);

    const later = await Promise.all([stack.server, second].map((s) => runDueJobs(s.db, stack.config, logger, new Date('2026-12-08T09:00:00Z'), [job])));
    expect(later.flat()).toEqual([job.name]);
    expect(runs).toEqual(['2026-12-07', '2026-12-08']);
  });

  it('when both processes run the real job list for the same week, then each job runs once across them', async () => {
    const now = new Date('2026-12-14T07:00:00Z');
    const ran = await Promise.all([stack.server.jobs.runDue(now), second.jobs.runDue(now)]);
    const names = ran.flat();
    expect(new Set(names).size).toBe(names.length);
    expect((await Promise.all([stack.server.jobs.runDue(now), second.jobs.runDue(now)])).flat()).toEqual([]);
  });
});
