import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, ensureUser, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import { writeAudit } from '../../server/audit/audit.js';

let stack: Stack;
let trial: TrialFixture;
let admin: Session;
let statistician: Session;
const ids: Record<string, string> = {};

/** A known trail: trial and membership changes by the admin, patient-level entries by the statistician. */
beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  [admin, statistician] = await Promise.all([stack.signIn(DEMO.admin), stack.signIn(DEMO.statistician)]);
  ids.admin = await ensureUser(stack.db, DEMO.admin);
  ids.statistician = await ensureUser(stack.db, DEMO.statistician);
  const entries = [
    { at: '2026-03-01T10:00:00Z', actor: ids.admin, entityType: 'trial', entityId: trial.trialId, action: 'updated', before: { title: 'Old' }, after: { title: 'New' } },
    { at: '2026-03-02T10:00:00Z', actor: ids.admin, entityType: 'membership', entityId: 'm-1', action: 'invited', after: { role: 'monitor' } },
    { at: '2026-03-03T10:00:00Z', actor: ids.statistician, entityType: 'patient', entityId: 'p-1', action: 'outcome_corrected', before: { outcome: 'pending' }, after: { outcome: 'responder', bestOverallResponse: 'PR' }, reason: 'Scan re-read' },
    { at: '2026-03-04T10:00:00Z', actor: ids.statistician, entityType: 'assessment', entityId: 'a-1', action: 'created', after: { response: 'PR' } },
    { at: '2026-03-05T10:00:00Z', actor: ids.statistician, entityType: 'data_cut', entityId: 'd-1', action: 'frozen', after: { responders: 4 } },
  ];
  // Inserted directly with their times (the table refuses updates, not inserts), so dates can be filtered.
  await stack.db('audit_log').insert(
    entries.map((e) => ({
      at: e.at,
      actor_user_id: e.actor,
      trial_id: trial.trialId,
      entity_type: e.entityType,
      entity_id: e.entityId,
      action: e.action,
      before: e.before ? JSON.stringify(e.before) : null,
      after: JSON.stringify(e.after),
      reason: e.reason ?? null,
    })),
  );
  const other = await createTrial(stack.db);
  await writeAudit(stack.db, { actorUserId: ids.admin, trialId: other.trialId, entityType: 'trial', entityId: other.trialId, action: 'updated' });
}, 120_000);
afterAll(async () => stack?.close());

const audit = (session: Session, query = '') => session.get(`/api/trials/${trial.trialId}/audit${query}`);

describe('audit trail', () => {
  it('when the statistician reads it, then every entry of this trial comes newest first with the actor e-mail, before, after and reason', async () => {
    const response = await audit(statistician);
    expect(response.status).toBe(200);
    expect(response.body.total).toBe(5);
    expect(response.body.entries.map((e: { entityType: string }) => e.entityType)).toEqual(['data_cut', 'assessment', 'patient', 'membership', 'trial']);
    expect(response.body.entries[2]).toMatchObject({
      actorEmail: DEMO.statistician,
      action: 'outcome_corrected',
      before: { outcome: 'pending' },
      after: { outcome: 'responder', bestOverallResponse: 'PR' },
      reason: 'Scan re-read',
      at: '2026-03-03T10:00:00.000Z',
    });
    expect(response.body.entityTypes).toEqual(['assessment', 'data_cut', 'membership', 'patient', 'trial']);
  });

  it('when the admin reads it, then entries carrying patient-level outcome data are left out entirely', async () => {
    const response = await audit(admin);
    expect(response.status).toBe(200);
    expect(response.body.patientLevelHidden).toBe(true);
    expect(response.body.total).toBe(2);
    expect(response.body.entries.map((e: { entityType: string }) => e.entityType)).toEqual(['membership', 'trial']);
    expect(response.body.entityTypes).toEqual(['membership', 'trial']);
    expect(JSON.stringify(response.body)).not.toMatch(/responder|Scan re-read|"PR"/);
    const asked = await audit(admin, '?entityType=patient');
    expect(asked.body.entries).toEqual([]);
  });

  it('when filtered by entity type, entity id, actor and dates, then only matching entries come back', async () => {
    const byType = await audit(statistician, '?entityType=membership');
    expect(byType.body.entries.map((e: { entityId: string }) => e.entityId)).toEqual(['m-1']);
    const byId = await audit(statistician, `?entityId=${trial.trialId}`);
    expect(byId.body.entries.map((e: { action: string }) => e.action)).toEqual(['updated']);
    const byActor = await audit(statistician, '?actor=ADA.ADMIN');
    expect(byActor.body.total).toBe(2);
    const byDates = await audit(statistician, '?from=2026-03-02&to=2026-03-04');
    expect(byDates.body.entries.map((e: { entityType: string }) => e.entityType)).toEqual(['assessment', 'patient', 'membership']);
  });

  it('when paged, then limit and offset walk the entries and the total stays', async () => {
    const first = await audit(statistician, '?limit=2&offset=0');
    const second = await audit(statistician, '?limit=2&offset=2');
    const third = await audit(statistician, '?limit=2&offset=4');
    expect([first.body.total, second.body.total, third.body.total]).toEqual([5, 5, 5]);
    const seen = [...first.body.entries, ...second.body.entries, ...third.body.entries].map((e: { id: number }) => e.id);
    expect(new Set(seen).size).toBe(5);
  });

  it('when the filters are malformed, then 400 names them', async () => {
    const response = await audit(statistician, '?limit=500&from=yesterday&offset=-1');
    expect(response.status).toBe(400);
    expect(Object.keys(response.body.error.fields).sort()).toEqual(['from', 'limit', 'offset']);
    const backwards = await audit(statistician, '?from=2026-03-05&to=2026-03-01');
    expect(backwards.body.error.fields).toEqual({ to: expect.any(String) });
  });

  it('when a coordinator, investigator, monitor or sponsor asks, then 403; a non-member gets 404', async () => {
    for (const email of [DEMO.coordinator, DEMO.investigator, DEMO.monitor, DEMO.sponsor]) {
      expect((await audit(await stack.signIn(email))).status, email).toBe(403);
    }
    expect((await audit(await stack.signIn('nina.newcomer@tessaly.test'))).status).toBe(404);
  });

  it('when the admin changes a site of the trial through the API, then the trail shows the change with before and after', async () => {
    const body = {
      code: trial.code,
      title: 'Renamed through the API',
      indication: 'Test indication',
      endpointDefinition: 'Objective response by RECIST 1.1',
      sites: Object.values(trial.siteIds).map((siteId) => ({ siteId, plannedAccrualPerMonth: 2 })),
      version: 1,
    };
    expect((await admin.patch(`/api/trials/${trial.trialId}`, body)).status).toBe(200);
    const response = await audit(admin, `?entityType=trial&limit=1`);
    expect(response.body.entries[0]).toMatchObject({
      actorEmail: DEMO.admin,
      action: 'updated',
      before: expect.objectContaining({ title: `Test trial ${trial.code}` }),
      after: expect.objectContaining({ title: 'Renamed through the API' }),
    });
  });
});
