/**
 * Adverse events over HTTP: entry at one's own sites, validation, corrections with a reason and a
 * version, removal, the investigator's attestation, the trial-wide list, the toxicity status of a
 * patient under the locked definition, and the CSV import with its dry run. Grades are CTCAE v5.0
 * (NCI Common Terminology Criteria for Adverse Events); the toxicity definition (grade, attribution
 * possible or stronger, a window from the first dose) is common practice.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { format, parseISO } from 'date-fns';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { daysFromToday, enrolOne, shiftDate } from '../support/assessment-factories.js';
import { addEventsDirectly, lockSafetyDesignDirectly } from '../support/safety-factories.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let cora: Session; // coordinator at SA
let ivan: Session; // investigator at SB
let sam: Session; // statistician
let mona: Session; // monitor
let ada: Session; // admin
let spencer: Session; // sponsor

const ENROLLED = daysFromToday(-90);
const day = (n: number) => shiftDate(ENROLLED, n);
const url = (patientId: string, eventId?: string) => `/api/trials/${trial.trialId}/patients/${patientId}/adverse-events${eventId ? `/${eventId}` : ''}`;
const EVENT = { onsetOn: day(10), term: 'Febrile neutropenia', grade: 3, attribution: 'probable', serious: true, outcome: 'recovered', notes: 'Admitted for 4 days' };

beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  // Response with a continuous toxicity boundary: grade 3+, possibly related or more, within 28 days.
  await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] }, { rule: 'toxicity_boundary', theta: 0.25, alpha: 0.1 });
  [cora, ivan, sam, mona, ada, spencer] = await Promise.all(
    [DEMO.coordinator, DEMO.investigator, DEMO.statistician, DEMO.monitor, DEMO.admin, DEMO.sponsor].map((email) => stack.signIn(email)),
  );
}, 120_000);
afterAll(async () => stack?.close());

const auditRows = (entityId: string) => stack.db('audit_log').where({ entity_id: entityId }).orderBy('id');
const eventCount = async (patientId: string) => Number((await stack.db('adverse_events').where({ patient_id: patientId }).count({ n: '*' }))[0].n);

describe('recording adverse events', () => {
  it('when a coordinator records an event at their site, then it is stored, audited, and the patient’s toxicity status comes back explained', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const res = await cora.post(url(patient.id), EVENT);
    expect(res.status).toBe(201);
    expect(res.body.event).toMatchObject({ ...EVENT, studyId: patient.studyId, version: 1, attested: null });
    expect(res.body.definition).toEqual({ minGrade: 3, windowDays: 28 });
    expect(res.body.toxicity.status).toBe('toxic');
    const onset = format(parseISO(EVENT.onsetOn), 'd MMMM yyyy');
    expect(res.body.toxicity.explanation).toContain(`Toxicity: the Febrile neutropenia with onset on ${onset} (grade 3 (Severe), probably related) meets the definition.`);
    expect(res.body.safety).toMatchObject({ paused: false });
    const audit = await auditRows(res.body.event.id);
    expect(audit.map((a) => [a.entity_type, a.action])).toEqual([['adverse_event', 'created']]);
    expect(audit[0].after).toMatchObject({ term: 'Febrile neutropenia', grade: 3, attribution: 'probable' });

    const read = await sam.get(url(patient.id));
    expect(read.status).toBe(200);
    expect(read.body.events.map((e: { term: string }) => e.term)).toEqual(['Febrile neutropenia']);
    expect((await mona.get(url(patient.id))).status).toBe(200);
  });

  it('when the grade and attribution are not known yet, then the event is stored without them and the patient awaits them', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const res = await cora.post(url(patient.id), { ...EVENT, grade: null, attribution: '', serious: false, outcome: 'recovering', notes: '' });
    expect(res.status).toBe(201);
    expect(res.body.event).toMatchObject({ grade: null, attribution: null, notes: null });
    expect(res.body.toxicity.status).toBe('not_assessable');
    expect(res.body.toxicity.awaitingEventIds).toEqual([res.body.event.id]);
  });

  it('when the onset is before enrolment, in the future or not a date, or the grade, attribution or outcome are wrong, then 400 names each field and nothing is written', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const before = await cora.post(url(patient.id), { ...EVENT, onsetOn: day(-1) });
    expect(before.status).toBe(400);
    expect(before.body.error.fields.onsetOn).toBe(`The onset cannot be before enrolment (${ENROLLED}).`);
    const future = await cora.post(url(patient.id), { ...EVENT, onsetOn: daysFromToday(3) });
    expect(future.body.error.fields.onsetOn).toBe('The onset date cannot be in the future.');
    expect((await cora.post(url(patient.id), { ...EVENT, onsetOn: '2026-02-30' })).body.error.fields.onsetOn).toBe('This is not a real calendar date.');
    const bad = await cora.post(url(patient.id), { ...EVENT, grade: 6, attribution: 'likely', outcome: 'better', term: '' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['attribution', 'grade', 'outcome', 'term']);
    const deathNotFatal = await cora.post(url(patient.id), { ...EVENT, grade: 5, outcome: 'recovered' });
    expect(deathNotFatal.status).toBe(400);
    expect(deathNotFatal.body.error.fields.outcome).toBe('Grade 5 (Death) goes with the outcome "fatal", and a fatal outcome with grade 5.');
    expect(await eventCount(patient.id)).toBe(0);
  });

  it('when site staff reach another site’s patient, then every event route answers 404; admin and sponsor get 403', async () => {
    const atSa = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const [eventId] = await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: atSa.id, events: [{ onsetOn: day(5) }] });
    expect((await ivan.get(url(atSa.id))).status).toBe(404);
    expect((await ivan.post(url(atSa.id), EVENT)).status).toBe(404);
    expect((await ivan.patch(url(atSa.id, eventId), { grade: 4, version: 1, reason: 'x' })).status).toBe(404);
    expect((await ivan.delete(url(atSa.id, eventId)).send({ version: 1, reason: 'x' })).status).toBe(404);
    expect((await ivan.post(`${url(atSa.id, eventId)}/attestation`, { version: 1 })).status).toBe(404);
    for (const session of [ada, spencer]) {
      expect((await session.get(url(atSa.id))).status).toBe(403);
      expect((await session.get(`/api/trials/${trial.trialId}/adverse-events`)).status).toBe(403);
    }
    expect((await sam.post(url(atSa.id), EVENT)).status).toBe(403);
    expect(await eventCount(atSa.id)).toBe(1);
  });
});

describe('corrections and removal', () => {
  it('when an event is corrected with a reason, then the version moves on and the audit row keeps before, after and reason; a stale version gets 409', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const created = (await cora.post(url(patient.id), { ...EVENT, grade: 2, attribution: 'possible' })).body.event;
    const noReason = await cora.patch(url(patient.id, created.id), { grade: 3, version: 1 });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toBe('Give the reason for the correction.');

    const corrected = await cora.patch(url(patient.id, created.id), { grade: 3, version: 1, reason: 'Nadir count re-read: grade 3' });
    expect(corrected.status).toBe(200);
    expect(corrected.body.event).toMatchObject({ grade: 3, version: 2 });
    expect(corrected.body.toxicity.status).toBe('toxic');
    const audit = await auditRows(created.id);
    expect(audit.map((a) => a.action)).toEqual(['created', 'corrected']);
    expect(audit[1]).toMatchObject({ reason: 'Nadir count re-read: grade 3', before: expect.objectContaining({ grade: 2 }), after: expect.objectContaining({ grade: 3 }) });

    const stale = await cora.patch(url(patient.id, created.id), { grade: 4, version: 1, reason: 'Late edit' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ grade: 3, version: 2 });
    const same = await cora.patch(url(patient.id, created.id), { grade: 3, version: 2, reason: 'No change' });
    expect(same.status).toBe(400);
    const fatalWithoutGrade5 = await cora.patch(url(patient.id, created.id), { outcome: 'fatal', version: 2, reason: 'Patient died' });
    expect(fatalWithoutGrade5.status).toBe(400);
    expect(fatalWithoutGrade5.body.error.fields.outcome).toBeDefined();
    expect((await auditRows(created.id)).length).toBe(2);
  });

  it('when an event is removed with its version and a reason, then it is gone and the removal is audited', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const created = (await cora.post(url(patient.id), EVENT)).body.event;
    expect((await cora.delete(url(patient.id, created.id)).send({ version: 1 })).status).toBe(400);
    const removed = await cora.delete(url(patient.id, created.id)).send({ version: 1, reason: 'Entered for the wrong patient' });
    expect(removed.status).toBe(200);
    expect(removed.body.events).toEqual([]);
    expect((await auditRows(created.id)).map((a) => [a.action, a.reason])).toEqual([
      ['created', null],
      ['removed', 'Entered for the wrong patient'],
    ]);
  });
});

describe('attestation by the site investigator', () => {
  it('when the investigator of the site attests an event, then it is signed; a correction clears the attestation', async () => {
    const patient = await enrolOne(stack.db, trial, { site: 'SB', enrolledOn: ENROLLED });
    const created = (await ivan.post(url(patient.id), EVENT)).body.event;
    await ivan.confirmToSign('attestation', created.id);
    const attested = await ivan.post(`${url(patient.id, created.id)}/attestation`, { version: 1 });
    expect(attested.status).toBe(201);
    expect(attested.body.signature).toMatchObject({
      subjectType: 'attestation',
      subjectId: created.id,
      meaning: `I attest that the adverse event "Febrile neutropenia" with onset on ${EVENT.onsetOn} recorded for ${patient.studyId} is accurate and complete`,
    });
    expect(attested.body.event).toMatchObject({ version: 2, attested: expect.objectContaining({ signerEmail: DEMO.investigator }) });
    expect((await ivan.post(`${url(patient.id, created.id)}/attestation`, { version: 2 })).status).toBe(409);

    const corrected = await ivan.patch(url(patient.id, created.id), { outcome: 'recovered_with_sequelae', version: 2, reason: 'Neuropathy persists' });
    expect(corrected.body).toMatchObject({ attestationCleared: true, event: { attested: null, version: 3 } });
    expect((await auditRows(created.id)).map((a) => a.action)).toEqual(['created', 'attested', 'corrected']);
  });

  it('when no password was entered for this event, or it was entered for another, then 401 asks for it and nothing is signed; a coordinator may not attest', async () => {
    const patient = await enrolOne(stack.db, trial, { site: 'SB', enrolledOn: ENROLLED });
    const [eventId, otherId] = await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: patient.id, events: [{ onsetOn: day(3) }, { onsetOn: day(4), term: 'Anaemia' }] });
    const unconfirmed = await ivan.post(`${url(patient.id, eventId)}/attestation`, { version: 1 });
    expect(unconfirmed.status).toBe(401);
    expect(unconfirmed.body.error).toMatchObject({ code: 'reauthentication_required', reauthUrl: `/auth/login?intent=attestation&subject=${eventId}` });
    // A password entered for the other event does not sign this one.
    await ivan.confirmToSign('attestation', otherId);
    expect((await ivan.post(`${url(patient.id, eventId)}/attestation`, { version: 1 })).status).toBe(401);
    const atSa = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const [saEvent] = await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: atSa.id, events: [{ onsetOn: day(3) }] });
    expect((await cora.post(`${url(atSa.id, saEvent)}/attestation`, { version: 1 })).status).toBe(403);
    const [{ n }] = await stack.db('adverse_events').whereIn('id', [eventId, otherId, saEvent]).whereNotNull('attestation_signature_id').count({ n: '*' });
    expect(Number(n)).toBe(0);
  });
});

describe('the trial-wide list', () => {
  it('when site staff list events, then only their sites’ events come back; the statistician sees all, filtered by grade', async () => {
    const atSb = await enrolOne(stack.db, trial, { site: 'SB', enrolledOn: ENROLLED });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: atSb.id, events: [{ onsetOn: day(2), term: 'Rash', grade: 1 }, { onsetOn: day(4), term: 'Sepsis', grade: 4 }] });
    const list = (session: Session, query = '') => session.get(`/api/trials/${trial.trialId}/adverse-events${query}`);
    const mine = await cora.get(`/api/trials/${trial.trialId}/adverse-events?pageSize=500`);
    expect(mine.status).toBe(200);
    expect(mine.body.events.every((e: { siteCode: string }) => e.siteCode === 'SA')).toBe(true);
    const all = await list(sam, '?pageSize=500');
    expect(all.body.events.some((e: { term: string }) => e.term === 'Sepsis')).toBe(true);
    const severe = await list(sam, `?minGrade=4&q=${atSb.studyId}`);
    expect(severe.body.events.map((e: { term: string }) => e.term)).toEqual(['Sepsis']);
    expect(severe.body.total).toBe(1);
    expect((await list(sam, '?minGrade=7')).status).toBe(400);
  });
});

describe('CSV import', () => {
  const csv = (rows: string[]) => Buffer.from(['study_id,onset_on,term,grade,attribution,serious,outcome,notes,correction_reason', ...rows].join('\n'));
  const upload = (session: Session, body: Buffer, dryRun: boolean) =>
    session.post(`/api/trials/${trial.trialId}/adverse-events/import${dryRun ? '?dryRun=1' : ''}`).attach('file', body, { filename: 'events.csv', contentType: 'text/csv' });

  it('when the template is downloaded, then it has the import’s columns', async () => {
    const res = await cora.get(`/api/trials/${trial.trialId}/adverse-events/import-template.csv`);
    expect(res.status).toBe(200);
    expect(res.text.trim()).toBe('study_id,onset_on,term,grade,attribution,serious,outcome,notes,correction_reason');
  });

  it('when a file is checked, then the dry run reports each row and writes nothing; the import then writes all rows, and the same file again changes nothing', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const file = csv([`${patient.studyId},${day(6)},Diarrhoea,2,possible,no,recovered,,`, `${patient.studyId},${day(8)},Neutropenia,,,yes,recovering,"=HYPERLINK(""x"")",`]);
    const auditBefore = Number((await stack.db('audit_log').count({ n: '*' }))[0].n);
    const dry = await upload(cora, file, true);
    expect(dry.status).toBe(200);
    expect(dry.body).toMatchObject({ dryRun: true, committed: false, counts: { total: 2, new: 2, error: 0 } });
    expect(await eventCount(patient.id)).toBe(0);
    expect(Number((await stack.db('audit_log').count({ n: '*' }))[0].n)).toBe(auditBefore);

    const done = await upload(cora, file, false);
    expect(done.body).toMatchObject({ committed: true, counts: { new: 2 } });
    const stored = await stack.db('adverse_events').where({ patient_id: patient.id }).orderBy('onset_on');
    expect(stored.map((e) => [e.term, e.grade, e.attribution, e.serious])).toEqual([
      ['Diarrhoea', 2, 'possible', false],
      ['Neutropenia', null, null, true],
    ]);
    expect(stored[1].notes).toBe(`'=HYPERLINK("x")`);
    const again = await upload(cora, file, false);
    expect(again.body.counts).toMatchObject({ unchanged: 2, new: 0 });
  });

  it('when one row is bad, then the import is refused with 422 and the report, and nothing is written; a changed row needs a correction reason', async () => {
    const patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED });
    const other = await enrolOne(stack.db, trial, { site: 'SB', enrolledOn: ENROLLED });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: patient.id, events: [{ onsetOn: day(3), term: 'Nausea', grade: 1, attribution: 'possible', outcome: 'recovered' }] });
    const file = csv([
      `${patient.studyId},${day(9)},Anaemia,3,definite,no,recovering,,`,
      `${patient.studyId},${day(3)},nausea,2,possible,no,recovered,,`,
      `${other.studyId},${day(4)},Rash,1,unlikely,no,recovered,,`,
      `${patient.studyId},${day(-2)},Headache,1,unrelated,maybe,recovered,,`,
    ]);
    const refused = await upload(cora, file, false);
    expect(refused.status).toBe(422);
    expect(refused.body.error.counts).toMatchObject({ total: 4, new: 1, error: 3 });
    const byLine = Object.fromEntries(refused.body.error.rows.map((r: { line: number; errors: Array<{ column: string }> }) => [r.line, r.errors.map((e) => e.column)]));
    expect(byLine).toMatchObject({ 2: [], 3: ['correction_reason'], 4: ['study_id'], 5: ['serious'] });
    expect(await eventCount(patient.id)).toBe(1);

    const fixed = await upload(cora, csv([`${patient.studyId},${day(3)},nausea,2,possible,no,recovered,,Graded again by the investigator`]), false);
    expect(fixed.body.counts).toMatchObject({ update: 1 });
    expect(await stack.db('adverse_events').where({ patient_id: patient.id }).first('term', 'grade', 'version')).toEqual({ term: 'Nausea', grade: 2, version: 2 });
  });
});
