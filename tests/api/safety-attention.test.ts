/**
 * Safety's part of Needs attention over HTTP: events without grade or attribution, serious events
 * not attested and toxicity windows closing within a week, per site; site staff see their own
 * sites only, and a patient whose window already holds a toxicity is not flagged.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial } from '../support/factories.js';
import { daysFromToday } from '../support/assessment-factories.js';
import { enrolPatientsDirectly } from '../support/patient-factories.js';
import { addEventsDirectly, lockSafetyDesignDirectly } from '../support/safety-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let cora: Session; // coordinator at SA
let sam: Session; // statistician
let spencer: Session; // sponsor

beforeAll(async () => {
  stack = await startStack();
  [cora, sam, spencer] = await Promise.all([DEMO.coordinator, DEMO.statistician, DEMO.sponsor].map((email) => stack.signIn(email)));
}, 120_000);
afterAll(async () => stack?.close());

type Item = { kind: string; studyId: string; message: string; date: string };
type Site = { siteCode: string; items: Item[] };

describe('safety in Needs attention', () => {
  it('when events lack a grade or attribution, a serious one is not attested and windows close soon, then each is listed under its site; site staff see their own', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId }, { rule: 'toxicity_boundary', theta: 0.25, alpha: 0.1, windowDays: 28 });
    // Enrolled 25 days ago: the 28-day window closes in 3 days.
    const [closing, toxicAlready, farOff] = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId,
      siteId: trial.siteIds.SA,
      patients: [{ enrolledOn: daysFromToday(-25) }, { enrolledOn: daysFromToday(-25) }, { enrolledOn: daysFromToday(-5) }],
    });
    const [atB] = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SB, patients: [{ enrolledOn: daysFromToday(-40) }] });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: toxicAlready.id, events: [{ onsetOn: daysFromToday(-20), grade: 3, attribution: 'probable' }] });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: farOff.id, events: [{ onsetOn: daysFromToday(-2), term: 'Headache', grade: null, attribution: 'possible' }] });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: atB.id, events: [{ onsetOn: daysFromToday(-30), term: 'Pneumonitis', grade: 3, attribution: 'unrelated', serious: true }] });

    const all = await sam.get(`/api/trials/${trial.trialId}/safety/needs-attention`);
    expect(all.status).toBe(200);
    expect(all.body.withinDays).toBe(7);
    const sites: Site[] = all.body.sites;
    const sa = sites.find((s) => s.siteCode === 'SA')?.items ?? [];
    const sb = sites.find((s) => s.siteCode === 'SB')?.items ?? [];
    expect(sa.map((i) => [i.kind, i.studyId]).sort()).toEqual(
      [
        ['event-awaits-assessment', farOff.studyId],
        ['toxicity-window-closing', closing.studyId],
      ].sort(),
    );
    expect(sa.find((i) => i.kind === 'event-awaits-assessment')?.message).toBe(`The Headache with onset on ${daysFromToday(-2)} still needs its grade.`);
    expect(sa.find((i) => i.kind === 'toxicity-window-closing')).toMatchObject({ date: daysFromToday(3), message: `The toxicity window closes in 3 days, on ${daysFromToday(3)}: record any adverse event with onset in the window before it is judged.` });
    expect(sb.map((i) => [i.kind, i.studyId])).toEqual([['serious-event-unattested', atB.studyId]]);

    const own: Site[] = (await cora.get(`/api/trials/${trial.trialId}/safety/needs-attention`)).body.sites;
    expect(own.map((s) => s.siteCode)).toEqual(['SA']);
    expect((await spencer.get(`/api/trials/${trial.trialId}/safety/needs-attention`)).status).toBe(403);
  });
});
