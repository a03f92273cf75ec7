import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, countRows, createTrial, type TrialFixture } from '../support/factories.js';
import { auditCount, createSite, enrolPatient, protocolSettingsBody, trialBody } from '../support/people-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let admin: Session;
let statistician: Session;
let coordinator: Session;
let monitor: Session;
let sponsor: Session;
let outsider: Session;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  [admin, statistician, coordinator, monitor, sponsor, outsider] = await Promise.all([
    stack.signIn(DEMO.admin),
    stack.signIn(DEMO.statistician),
    stack.signIn(DEMO.coordinator),
    stack.signIn(DEMO.monitor),
    stack.signIn(DEMO.sponsor),
    stack.signIn('nina.newcomer@tessaly.test'),
  ]);
}, 120_000);
afterAll(async () => stack?.close());

const writes = () => [
  { label: 'create a trial', call: (s: Session) => s.post('/api/trials', trialBody()) },
  { label: 'edit the trial', call: (s: Session) => s.patch(`/api/trials/${trial.trialId}`, trialBody({ version: 1 })) },
  { label: 'add a cohort', call: (s: Session) => s.post(`/api/trials/${trial.trialId}/cohorts`, { code: 'EXTRA', name: 'Extra' }) },
  {
    label: 'rename a cohort',
    call: (s: Session) => s.patch(`/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}`, { code: 'MAIN', name: 'Renamed', version: 1 }),
  },
];

async function auditRows(entityType: string, entityId: string) {
  return stack.db('audit_log').where({ entity_type: entityType, entity_id: entityId }).orderBy('id');
}

describe('creating a trial', () => {
  it('when an admin creates a trial without cohorts, then it has one "All patients" cohort, its sites, the creator as admin and audit rows', async () => {
    const site = await createSite(stack.db);
    const body = trialBody({ sites: [{ siteId: site.id, plannedAccrualPerMonth: 2 }] });
    const response = await admin.post('/api/trials', body);
    expect(response.status).toBe(201);
    const created = response.body.trial;
    expect(created).toMatchObject({ code: body.code, title: body.title, startDate: '2026-03-01', plannedAccrualPerMonth: 3, status: 'draft', version: 1 });
    expect(created.cohorts).toEqual([expect.objectContaining({ code: 'MAIN', name: 'All patients', status: 'draft' })]);
    expect(created.sites).toEqual([expect.objectContaining({ id: site.id, code: site.code, plannedAccrualPerMonth: 2 })]);
    expect(created.protocolSettings).toMatchObject({ outcomeSource: 'entered', confirmationRequired: true });

    const mine = await admin.get('/api/trials');
    expect(mine.body.trials.map((t: { id: string }) => t.id)).toContain(created.id);
    const memberships = await stack.db('memberships').where({ trial_id: created.id });
    expect(memberships).toEqual([expect.objectContaining({ email: DEMO.admin, role: 'admin', status: 'active' })]);

    expect((await auditRows('trial', created.id)).map((r) => r.action)).toEqual(['created']);
    expect((await auditRows('cohort', created.cohorts[0].id)).map((r) => r.action)).toEqual(['created']);
    expect((await auditRows('membership', memberships[0].id)).map((r) => r.action)).toEqual(['created']);
  });

  it('when an admin creates a basket trial, then each cohort is created in order', async () => {
    const cohorts = [
      { code: 'NSCLC', name: 'Non-small-cell lung cancer' },
      { code: 'CRC', name: 'Colorectal cancer' },
      { code: 'THY', name: 'Thyroid cancer' },
    ];
    const response = await admin.post('/api/trials', trialBody({ cohorts }));
    expect(response.status).toBe(201);
    expect(response.body.trial.cohorts.map((c: { code: string; position: number }) => [c.code, c.position])).toEqual([
      ['NSCLC', 1],
      ['CRC', 2],
      ['THY', 3],
    ]);
  });

  it('when the input is bad, then 400 names each field and nothing is written', async () => {
    const before = { trials: await countRows(stack.db, 'trials'), cohorts: await countRows(stack.db, 'cohorts'), audit: await auditCount(stack.db) };
    const response = await admin.post('/api/trials', {
      code: 'bad code',
      title: '',
      indication: 'x',
      endpointDefinition: 'x',
      plannedAccrualPerMonth: -1,
      startDate: '2026-02-30',
      cohorts: [{ code: 'A', name: 'One' }, { code: 'A', name: 'Two' }],
    });
    expect(response.status).toBe(400);
    expect(Object.keys(response.body.error.fields).sort()).toEqual(['code', 'cohorts', 'plannedAccrualPerMonth', 'startDate', 'title']);
    expect(response.body.error.fields.startDate).toMatch(/calendar date/);
    expect({ trials: await countRows(stack.db, 'trials'), cohorts: await countRows(stack.db, 'cohorts'), audit: await auditCount(stack.db) }).toEqual(before);
  });

  it('when a chosen site does not exist, then 400 on that site and nothing is written', async () => {
    const before = await countRows(stack.db, 'trials');
    const response = await admin.post('/api/trials', trialBody({ sites: [{ siteId: '00000000-0000-4000-8000-000000000000' }] }));
    expect(response.status).toBe(400);
    expect(response.body.error.fields).toEqual({ 'sites[0].siteId': expect.any(String) });
    expect(await countRows(stack.db, 'trials')).toBe(before);
  });

  it('when the trial code is already used, then 409 and nothing is written', async () => {
    const before = { trials: await countRows(stack.db, 'trials'), audit: await auditCount(stack.db) };
    const response = await admin.post('/api/trials', trialBody({ code: trial.code }));
    expect(response.status).toBe(409);
    expect(response.body.error.message).toContain(trial.code);
    expect({ trials: await countRows(stack.db, 'trials'), audit: await auditCount(stack.db) }).toEqual(before);
  });
});

describe('editing a trial', () => {
  it('when the admin edits the trial and its sites, then the record and per-site accrual change and the audit keeps before and after', async () => {
    const fixture = await createTrial(stack.db, { sites: ['EA', 'EB'] });
    const extra = await createSite(stack.db);
    const response = await admin.patch(
      `/api/trials/${fixture.trialId}`,
      trialBody({
        code: fixture.code,
        title: 'A clearer title',
        plannedAccrualPerMonth: 5,
        version: 1,
        sites: [
          { siteId: fixture.siteIds.EA, plannedAccrualPerMonth: 3 },
          { siteId: fixture.siteIds.EB, plannedAccrualPerMonth: 1 },
          { siteId: extra.id, plannedAccrualPerMonth: 2 },
        ],
      }),
    );
    expect(response.status).toBe(200);
    expect(response.body.trial).toMatchObject({ title: 'A clearer title', plannedAccrualPerMonth: 5, version: 2 });
    expect(response.body.trial.sites.map((s: { code: string; plannedAccrualPerMonth: number }) => [s.code, s.plannedAccrualPerMonth])).toEqual(
      [['EA', 3], ['EB', 1], [extra.code, 2]].sort((a, b) => String(a[0]).localeCompare(String(b[0]))),
    );
    const [row] = await auditRows('trial', fixture.trialId);
    expect(row.action).toBe('updated');
    expect(row.before.title).toBe(`Test trial ${fixture.code}`);
    expect(row.after.title).toBe('A clearer title');
    expect(row.after.sites).toHaveLength(3);
  });

  it('when the version is stale, then 409 with the current record and nothing changes', async () => {
    const fixture = await createTrial(stack.db);
    const sites = Object.values(fixture.siteIds).map((siteId) => ({ siteId }));
    expect((await admin.patch(`/api/trials/${fixture.trialId}`, trialBody({ code: fixture.code, title: 'First edit', version: 1, sites }))).status).toBe(200);
    const auditBefore = await auditCount(stack.db);
    const stale = await admin.patch(`/api/trials/${fixture.trialId}`, trialBody({ code: fixture.code, title: 'Second edit', version: 1, sites }));
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: fixture.trialId, title: 'First edit', version: 2 });
    expect((await stack.db('trials').where({ id: fixture.trialId }).first()).title).toBe('First edit');
    expect(await auditCount(stack.db)).toBe(auditBefore);
  });

  it('when a site that has patients or members is dropped, then 409 names it and the sites stay', async () => {
    const fixture = await createTrial(stack.db, { sites: ['DA', 'DB'] });
    await enrolPatient(stack.db, fixture, fixture.siteIds.DA);
    const response = await admin.patch(`/api/trials/${fixture.trialId}`, trialBody({ code: fixture.code, version: 1, sites: [] }));
    expect(response.status).toBe(409);
    expect(response.body.error.message).toMatch(/DA \(1 patients/);
    expect(await stack.db('trial_sites').where({ trial_id: fixture.trialId }).count({ n: '*' })).toEqual([{ n: 2 }]);
  });

  it('when the input is bad, then 400 with field messages and the trial is unchanged', async () => {
    const fixture = await createTrial(stack.db);
    const response = await admin.patch(`/api/trials/${fixture.trialId}`, { code: fixture.code, title: 'x'.repeat(201) });
    expect(response.status).toBe(400);
    expect(response.body.error.fields).toMatchObject({ title: expect.any(String), indication: expect.any(String), version: expect.any(String) });
    expect((await stack.db('trials').where({ id: fixture.trialId }).first()).version).toBe(1);
  });
});

describe('cohorts while the trial is a draft', () => {
  it('when the admin adds and renames a cohort of a draft trial, then both are saved and audited', async () => {
    const fixture = await createTrial(stack.db);
    const added = await admin.post(`/api/trials/${fixture.trialId}/cohorts`, { code: 'CRC', name: 'Colorectal' });
    expect(added.status).toBe(201);
    expect(added.body.cohort).toMatchObject({ code: 'CRC', position: 2, status: 'draft' });
    const renamed = await admin.patch(`/api/trials/${fixture.trialId}/cohorts/${added.body.cohort.id}`, { code: 'CRC', name: 'Colorectal cancer', version: 1 });
    expect(renamed.status).toBe(200);
    expect(renamed.body.cohort).toMatchObject({ name: 'Colorectal cancer', version: 2 });
    expect((await auditRows('cohort', added.body.cohort.id)).map((r) => r.action)).toEqual(['created', 'updated']);
  });

  it('when the code is used already, the version is stale or the trial is enrolling, then 409 and nothing is written', async () => {
    const fixture = await createTrial(stack.db, { cohorts: ['A', 'B'] });
    const auditBefore = await auditCount(stack.db);
    expect((await admin.post(`/api/trials/${fixture.trialId}/cohorts`, { code: 'A', name: 'Again' })).status).toBe(409);
    expect((await admin.patch(`/api/trials/${fixture.trialId}/cohorts/${fixture.cohortIds[1]}`, { code: 'B', name: 'B', version: 7 })).status).toBe(409);
    await stack.db('cohorts').where({ id: fixture.cohortIds[0] }).update({ status: 'enrolling_stage_1' });
    const late = await admin.post(`/api/trials/${fixture.trialId}/cohorts`, { code: 'C', name: 'Late' });
    expect(late.status).toBe(409);
    expect(late.body.error.message).toMatch(/draft/);
    expect(await stack.db('cohorts').where({ trial_id: fixture.trialId }).count({ n: '*' })).toEqual([{ n: 2 }]);
    expect(await auditCount(stack.db)).toBe(auditBefore);
  });

  it('when a cohort code is malformed, then 400 on the code', async () => {
    const response = await admin.post(`/api/trials/${trial.trialId}/cohorts`, { code: 'lower case', name: '' });
    expect(response.status).toBe(400);
    expect(Object.keys(response.body.error.fields).sort()).toEqual(['code', 'name']);
  });
});

describe('protocol settings for outcomes', () => {
  it('when the statistician changes them, then they are saved, the version moves on and the audit holds before and after', async () => {
    const fixture = await createTrial(stack.db);
    const response = await statistician.patch(`/api/trials/${fixture.trialId}/protocol-settings`, protocolSettingsBody(1, { sdMinDays: 49 }));
    expect(response.status).toBe(200);
    expect(response.body.trial.protocolSettings).toMatchObject({ outcomeSource: 'derived', sdMinDays: 49 });
    expect(response.body.trial.version).toBe(2);
    const [row] = await auditRows('trial', fixture.trialId);
    expect(row).toMatchObject({ action: 'protocol_settings_changed', before: expect.objectContaining({ outcomeSource: 'entered', sdMinDays: 42 }) });
    expect(row.after).toMatchObject({ outcomeSource: 'derived', sdMinDays: 49 });
  });

  it('when patients are enrolled and no reason is given, then 400 on the reason; with a reason it is saved', async () => {
    const fixture = await createTrial(stack.db);
    await enrolPatient(stack.db, fixture, Object.values(fixture.siteIds)[0]);
    const refused = await statistician.patch(`/api/trials/${fixture.trialId}/protocol-settings`, protocolSettingsBody(1));
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields).toEqual({ reason: expect.any(String) });
    const saved = await statistician.patch(`/api/trials/${fixture.trialId}/protocol-settings`, protocolSettingsBody(1, { reason: 'Protocol amendment 2' }));
    expect(saved.status).toBe(200);
    expect((await auditRows('trial', fixture.trialId))[0].reason).toBe('Protocol amendment 2');
  });

  it('when values are out of range or the version is stale, then 400 or 409 and nothing changes', async () => {
    const fixture = await createTrial(stack.db);
    const bad = await statistician.patch(`/api/trials/${fixture.trialId}/protocol-settings`, protocolSettingsBody(1, { confirmationMinDays: 0, outcomeSource: 'guessed' }));
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['confirmationMinDays', 'outcomeSource']);
    const stale = await statistician.patch(`/api/trials/${fixture.trialId}/protocol-settings`, protocolSettingsBody(4));
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.protocolSettings.outcomeSource).toBe('entered');
  });

  it('when the admin tries to change them, then 403', async () => {
    expect((await admin.patch(`/api/trials/${trial.trialId}/protocol-settings`, protocolSettingsBody(1))).status).toBe(403);
  });
});

describe('who may set up a trial', () => {
  it.each([
    ['coordinator', () => coordinator],
    ['monitor', () => monitor],
    ['sponsor', () => sponsor],
    ['statistician', () => statistician],
  ])('when a %s tries any trial set-up write, then 403 and nothing is written', async (_role, session) => {
    const before = { trials: await countRows(stack.db, 'trials'), cohorts: await countRows(stack.db, 'cohorts'), audit: await auditCount(stack.db) };
    for (const write of writes()) {
      const response = await write.call(session());
      expect(response.status, write.label).toBe(403);
    }
    expect({ trials: await countRows(stack.db, 'trials'), cohorts: await countRows(stack.db, 'cohorts'), audit: await auditCount(stack.db) }).toEqual(before);
  });

  it('when someone who is not a member edits the trial, then 404; creating a trial needs admin somewhere, so 403', async () => {
    const [create, ...rest] = writes();
    expect((await create.call(outsider)).status).toBe(403);
    for (const write of rest) expect((await write.call(outsider)).status, write.label).toBe(404);
    expect((await outsider.patch(`/api/trials/${trial.trialId}/protocol-settings`, protocolSettingsBody(1))).status).toBe(404);
  });
});
