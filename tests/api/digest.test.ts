/**
 * The weekly digest to sponsors: a scheduled job claimed once per ISO week across server
 * processes, one e-mail per sponsor, aggregate figures with response figures only where released
 * (the released cut's frozen figures, under its date), and a development preview.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type Member, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import { daysAgo } from '../support/accrual-factories.js';
import { releaseCutDirectly } from '../support/data-cut-factories.js';
import { isoWeekOf, toDay } from '../../server/accrual/calendar.js';

const OTHER_SPONSOR = 'lena.stat@tessaly.test';

let stack: Stack;
let hidden: TrialFixture;
let released: TrialFixture;
let otherSponsors: TrialFixture;

async function trialWithPatients(members?: Member[]): Promise<TrialFixture> {
  const trial = await createTrial(stack.db, { members });
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
  await enrolPatientsDirectly(stack.db, {
    trialId: trial.trialId,
    cohortId: trial.cohortIds[0],
    siteId: trial.siteIds.SA,
    patients: [{ outcome: 'responder' }, { outcome: 'non_responder' }, { outcome: 'non_responder' }, {}],
    firstEnrolledOn: daysAgo(30),
  });
  return trial;
}

const digestRows = () => stack.db('mail_outbox').where({ kind: 'weekly-digest' }).orderBy('id').select('to_address', 'subject', 'body_text', 'dedupe_key');

beforeAll(async () => {
  stack = await startStack();
  hidden = await trialWithPatients();
  released = await trialWithPatients();
  await releaseCutDirectly(stack.db, released);
  otherSponsors = await trialWithPatients([
    { email: DEMO.statistician, role: 'statistician' },
    { email: OTHER_SPONSOR, role: 'sponsor' },
  ]);
}, 120_000);
afterAll(async () => stack?.close());

describe('weekly digest', () => {
  it('when two server processes run due jobs at the same moment, then one runs the digest and each sponsor gets one e-mail; a new week gets a new set', async () => {
    const second = await stack.startSecondServer();
    const monday = new Date('2026-12-07T06:00:00Z');
    const [first, other] = await Promise.all([stack.server.jobs.runDue(monday), second.jobs.runDue(monday)]);
    expect([...first, ...other].filter((job) => job === 'weekly-digest')).toHaveLength(1);
    let rows = await digestRows();
    expect(rows.map((r) => r.to_address).sort()).toEqual([OTHER_SPONSOR, DEMO.sponsor].sort());
    expect(rows.every((r) => r.subject.startsWith('Orrery weekly digest 2026-W50'))).toBe(true);

    const laterThatWeek = new Date('2026-12-10T15:00:00Z');
    expect(await Promise.all([stack.server.jobs.runDue(laterThatWeek), second.jobs.runDue(laterThatWeek)])).toEqual([[], []]);
    expect(await digestRows()).toHaveLength(2);

    const nextWeek = new Date('2026-12-14T06:00:00Z');
    await Promise.all([second.jobs.runDue(nextWeek), stack.server.jobs.runDue(nextWeek)]);
    rows = await digestRows();
    expect(rows).toHaveLength(4);
    expect(rows.filter((r) => r.subject.includes('2026-W51'))).toHaveLength(2);
    expect(await stack.db('job_runs').where({ job: 'weekly-digest' }).orderBy('period').pluck('period')).toEqual(['2026-W50', '2026-W51']);

    const caught = await eventually(() => (stack.catcher.messages.filter((m) => m.subject.startsWith('Orrery weekly digest')).length === 4 ? stack.catcher.messages : undefined));
    expect(caught.filter((m) => m.to.includes(DEMO.sponsor) && m.subject.startsWith('Orrery weekly digest'))).toHaveLength(2);
  });

  it('when the digest is written, then a sponsor reads aggregate counts and response figures only for the released trial', async () => {
    const [mail] = (await digestRows()).filter((r) => r.to_address === DEMO.sponsor);
    const section = (code: string) => mail.body_text.split('\n\n').find((block: string) => block.startsWith(code)) as string;
    expect(section(hidden.code)).toContain('Enrolled 4');
    expect(section(hidden.code)).toContain('Response figures: not shown.');
    expect(section(hidden.code)).not.toMatch(/Response: |responders? among/);
    expect(section(released.code)).toMatch(/Response as of the data cut of \d{1,2} [A-Z][a-z]+ \d{4}: 1 responder among 3 decided patients \(33\.3%, naive estimate\)/);
    expect(section(released.code)).not.toMatch(/Response \(live\)|Last committee recommendation/);
    expect(section(hidden.code)).toContain('Next: stage-1 cohort complete in ~9 patients');
    expect(section(released.code)).toMatch(/Next: full cohort \(n = 43\) enrolled/);
    expect(mail.body_text).toContain('Decision support only');
    expect(mail.body_text).not.toContain(otherSponsors.code);
    const [other] = (await digestRows()).filter((r) => r.to_address === OTHER_SPONSOR);
    expect(other.body_text).toContain(otherSponsors.code);
    expect(other.body_text).not.toContain(hidden.code);
  });

  it('when a sponsor previews the digest, then this week’s e-mail is rendered without being queued', async () => {
    const before = (await digestRows()).length;
    const sponsor = await stack.signIn(DEMO.sponsor);
    const res = await sponsor.get('/api/dev/digest-preview');
    expect(res.status).toBe(200);
    expect(res.body.preview).toMatchObject({ to: DEMO.sponsor, period: isoWeekOf(toDay(new Date())) });
    expect(res.body.preview.text).toContain(hidden.code);
    expect(await digestRows()).toHaveLength(before);
    const statistician = await stack.signIn(DEMO.statistician);
    expect((await statistician.get('/api/dev/digest-preview')).body).toEqual({ preview: null });
  });
});
