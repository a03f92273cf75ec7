/**
 * 200 outcome writes to one trial at the same moment: every write is accounted for (versions and
 * audit rows equal the successful writes, nothing lost), and two edits of the same patient from
 * the same version end with one success and one 409 carrying the current record.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';

const PATIENTS = 150;
const CONFLICTING = 50;

let stack: Stack;
let trial: TrialFixture;
let patients: Array<{ id: string; studyId: string }>;

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  // Single stage and large enough that no stopping rule is reached while the writes land.
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], r1: null, n1: null, r: 90, n: 200 });
  patients = await enrolPatientsDirectly(stack.db, {
    trialId: trial.trialId,
    cohortId: trial.cohortIds[0],
    siteId: Object.values(trial.siteIds)[0],
    count: PATIENTS,
    firstEnrolledOn: '2025-06-02',
  });
}, 120_000);
afterAll(async () => stack?.close());

const responder = { outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: '2026-04-01', evaluable: true };
const nonResponder = { outcome: 'non_responder', bestOverallResponse: 'SD', responseAssessedOn: '2026-04-02', evaluable: true };

describe('concurrent outcome writes', () => {
  it(`when ${PATIENTS + CONFLICTING} outcome writes hit one trial at once (${CONFLICTING} of them racing another edit of the same patient and version), then none is lost and each race has one winner and one 409`, async () => {
    const cora = await stack.signIn(DEMO.coordinator);
    const writes = [
      ...patients.map((p, i) => ({ patient: p, body: { version: 1, ...(i % 2 === 0 ? responder : nonResponder) } })),
      ...patients.slice(0, CONFLICTING).map((p, i) => ({ patient: p, body: { version: 1, ...(i % 2 === 0 ? nonResponder : responder) } })),
    ];
    const answers = await Promise.all(
      writes.map(async (write) => {
        const res = await cora.patch(`/api/trials/${trial.trialId}/patients/${write.patient.id}`, write.body).timeout(30_000);
        return { ...write, status: res.status, body: res.body };
      }),
    );

    const byStatus = answers.reduce<Record<number, number>>((tally, a) => ({ ...tally, [a.status]: (tally[a.status] ?? 0) + 1 }), {});
    console.info(`[concurrency] ${answers.length} writes: ${JSON.stringify(byStatus)}`);
    expect(byStatus).toEqual({ 200: PATIENTS, 409: CONFLICTING });

    for (const patient of patients.slice(0, CONFLICTING)) {
      const race = answers.filter((a) => a.patient.id === patient.id);
      const winner = race.find((a) => a.status === 200);
      const loser = race.find((a) => a.status === 409);
      expect(winner && loser).toBeTruthy();
      expect(loser!.body.error.current).toMatchObject({ id: patient.id, version: 2, outcome: winner!.body.patient.outcome });
    }

    const rows: Array<{ id: string; version: number; outcome: string }> = await stack.db('patients').whereIn('id', patients.map((p) => p.id)).select('id', 'version', 'outcome');
    expect(rows.every((r) => r.version === 2)).toBe(true);
    const winners = new Map(answers.filter((a) => a.status === 200).map((a) => [a.patient.id, a.body.patient.outcome]));
    expect(rows.every((r) => winners.get(r.id) === r.outcome)).toBe(true);
    const [{ count }] = await stack
      .db('audit_log')
      .where({ entity_type: 'patient' })
      .whereIn('action', ['outcome_recorded', 'outcome_corrected'])
      .whereIn('entity_id', patients.map((p) => p.id))
      .count({ count: '*' });
    expect(Number(count)).toBe(PATIENTS);
  }, 90_000);
});
