/**
 * The mail service unreachable: the request that queues mail still succeeds, the messages wait in
 * PostgreSQL and are retried, and each is delivered exactly once after the service returns.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, eventually, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';

let stack: Stack;
let trial: TrialFixture;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
}, 120_000);
afterAll(async () => stack?.close());

describe('mail catcher down', () => {
  it('when people are invited while the mail service is down, then the invitations succeed, the mails stay queued and are retried, and each arrives once after it returns', async () => {
    const admin = await stack.signIn(DEMO.admin);
    await stack.catcher.stopSmtp();
    const invitees = ['ola.one@tessaly.test', 'pia.two@tessaly.test', 'rui.three@tessaly.test'];
    for (const email of invitees) {
      const res = await admin.post(`/api/trials/${trial.trialId}/memberships`, { email, role: 'monitor' });
      expect(res.status).toBe(201);
    }
    const queued = () => stack.db('mail_outbox').whereIn('to_address', invitees);
    // Several delivery attempts fail while the service is down; the rows stay queued with the reason.
    await eventually(async () => {
      const rows = await queued();
      return rows.length === invitees.length && rows.every((r) => r.status === 'queued' && r.attempts >= 2 && r.last_error);
    }, 15_000);
    expect(stack.catcher.messages.filter((m) => invitees.includes(m.to[0]))).toEqual([]);

    await stack.catcher.startSmtp();
    await eventually(async () => (await queued()).every((r) => r.status === 'sent'), 20_000);
    const delivered = stack.catcher.messages.filter((m) => invitees.includes(m.to[0])).map((m) => m.to[0]);
    expect(delivered.sort()).toEqual([...invitees].sort());
  }, 60_000);
});
