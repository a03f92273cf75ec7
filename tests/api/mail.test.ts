import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let admin: Session;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  admin = await stack.signIn(DEMO.admin);
}, 120_000);
afterAll(async () => stack?.close());

const invite = (email: string, role = 'monitor') => admin.post(`/api/trials/${trial.trialId}/memberships`, { email, role });
const received = (to: string) => stack.catcher.messages.find((m) => m.to.includes(to));

describe('invitation e-mail', () => {
  it('when the admin invites someone, then an invitation naming the trial, the role and the app address arrives at the mail catcher', async () => {
    const response = await invite('mika.monitor@tessaly.test');
    expect(response.status).toBe(201);
    const message = await eventually(() => received('mika.monitor@tessaly.test'));
    expect(message.subject).toContain(trial.code);
    expect(message.subject).toContain('data monitoring committee');
    expect(message.text).toContain(`${trial.code} (Test trial ${trial.code})`);
    expect(message.text).toContain(stack.config.appOrigin);
    expect(message.text).toContain(DEMO.admin);
    expect(message.text).toMatch(/becomes active when you first sign in/);
    // The catcher has the message a moment before the worker, told the send went through, marks the row sent.
    const row = await eventually(async () => {
      const found = await stack.db('mail_outbox').where({ to_address: 'mika.monitor@tessaly.test' }).first();
      return found?.status === 'sent' ? found : undefined;
    });
    expect(row).toMatchObject({ kind: 'invitation', status: 'sent' });
  });

  it('when the mail catcher is down, then the invitation still succeeds, stays queued with failed attempts, and is delivered once the catcher is back', async () => {
    await stack.catcher.stopSmtp();
    try {
      const response = await invite('queued.person@tessaly.test', 'sponsor');
      expect(response.status).toBe(201);
      const queued = await eventually(async () => {
        const row = await stack.db('mail_outbox').where({ to_address: 'queued.person@tessaly.test' }).first();
        return row && row.attempts > 0 && row.status !== 'sending' ? row : undefined;
      });
      expect(queued.status).not.toBe('sent');
      expect(queued.last_error).toBeTruthy();
      expect(received('queued.person@tessaly.test')).toBeUndefined();
    } finally {
      await stack.catcher.startSmtp();
    }
    const message = await eventually(() => received('queued.person@tessaly.test'), 20_000);
    expect(message.subject).toContain(trial.code);
    const sent = await stack.db('mail_outbox').where({ to_address: 'queued.person@tessaly.test' }).first();
    expect(sent.status).toBe('sent');
    expect(sent.attempts).toBeGreaterThan(1);
  }, 40_000);
});
