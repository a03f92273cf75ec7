/**
 * Adverse events as a site works with them: recorded by the coordinator or investigator at their
 * own sites (other sites' patients answer 404), corrected with a reason (a stale version gets 409
 * with the current record), removed with a reason, and attested by the site investigator with an
 * electronic signature; a change to an attested event clears the attestation. Every write runs in
 * one transaction with its audit row, and then holds the cohort against its safety rule (a crossing
 * pauses accrual in the same transaction). The functions taking a transaction are composable: the
 * CSV import calls them row by row.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import { ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { siteScope, writableSites, type Actor } from '../auth/access.js';
import { recordSignature, type SigningSession } from '../signatures/signatures.js';
import { currentDesign, type ToxicityDefinition } from '../designs/index.js';
import { findPatient, type Patient } from '../patients/index.js';
import { holdsRoleAtSite } from '../people/index.js';
import { eventAttestationSchema, eventCorrectionSchema, eventRemovalSchema, eventSchema, type EventListQuery } from './safety.schema.js';
import {
  deleteEvent,
  EVENT_FIELDS,
  findEvent,
  insertEvent,
  listEvents,
  listEventsOfPatient,
  setEventAttestation,
  updateEvent,
  type AdverseEvent,
  type EventFields,
} from './adverse-events.repository.js';
import { applySafetyRules, todayIso, type SafetyOutcome } from './safety-rules.js';
import { deriveToxicity, type ToxicityDerivation } from './toxicity.js';

/** A patient the caller may see at these sites: other sites answer 404, exactly like a patient that does not exist. */
async function visiblePatient(db: Db | Knex.Transaction, actor: Actor, patientId: string, sites: string[] | 'all', lock = false): Promise<Patient> {
  const patient = /^[0-9a-f-]{36}$/i.test(patientId) ? await findPatient(db, actor.access.trialId, patientId, 'all', { forUpdate: lock }) : undefined;
  if (!patient || (sites !== 'all' && !sites.includes(patient.siteId))) throw new NotFoundError('The patient');
  return patient;
}

async function requireEvent(db: Db | Knex.Transaction, patientId: string, eventId: string, lock = false): Promise<AdverseEvent> {
  const event = /^[0-9a-f-]{36}$/i.test(eventId) ? await findEvent(db, patientId, eventId, { forUpdate: lock }) : undefined;
  if (!event) throw new NotFoundError('The adverse event');
  return event;
}

/** What the audit trail keeps of an event. */
const auditSnapshot = (e: AdverseEvent) => ({
  studyId: e.studyId,
  onsetOn: e.onsetOn,
  term: e.term,
  grade: e.grade,
  attribution: e.attribution,
  serious: e.serious,
  outcome: e.outcome,
  notes: e.notes,
  attestationSignatureId: e.attested?.signatureId ?? null,
});

const fieldsOf = (e: EventFields): EventFields => ({ onsetOn: e.onsetOn, term: e.term, grade: e.grade, attribution: e.attribution, serious: e.serious, outcome: e.outcome, notes: e.notes });

export type PatientEventsView = {
  patient: Pick<Patient, 'id' | 'studyId' | 'siteId' | 'siteCode' | 'cohortId' | 'cohortCode' | 'enrolledOn'>;
  events: AdverseEvent[];
  /** The cohort's toxicity definition in force, or null when its design has no safety rule. */
  definition: ToxicityDefinition | null;
  toxicity: ToxicityDerivation | null;
};

async function view(db: Db | Knex.Transaction, patient: Patient): Promise<PatientEventsView> {
  const events = await listEventsOfPatient(db, patient.id);
  const definition = (await currentDesign(db, patient.cohortId))?.toxicity ?? null;
  return {
    patient: { id: patient.id, studyId: patient.studyId, siteId: patient.siteId, siteCode: patient.siteCode, cohortId: patient.cohortId, cohortCode: patient.cohortCode, enrolledOn: patient.enrolledOn },
    events,
    definition,
    toxicity: definition ? deriveToxicity({ enrolledOn: patient.enrolledOn, events, definition, today: todayIso() }) : null,
  };
}

export async function patientEvents(db: Db, actor: Actor, patientId: string): Promise<PatientEventsView> {
  return view(db, await visiblePatient(db, actor, patientId, siteScope(actor.access)));
}

/**
 * What a write answers: the patient's events and whether the write paused the cohort's accrual —
 * the pause is operational, the cohort's counts are not (site staff write; the figures are read
 * through the visibility rule on the safety route).
 */
export type EventWrite = PatientEventsView & { event: AdverseEvent; safety: Pick<SafetyOutcome, 'paused'> };

/** Inserts one checked event of a locked patient and audits it; the caller applies the safety rules. */
export async function createEvent(trx: Knex.Transaction, patient: Patient, input: EventFields, userId: string, reason?: string): Promise<AdverseEvent> {
  const eventId = await insertEvent(trx, { ...input, trialId: patient.trialId, patientId: patient.id, createdBy: userId });
  const event = (await findEvent(trx, patient.id, eventId)) as AdverseEvent;
  await writeAudit(trx, { actorUserId: userId, trialId: patient.trialId, entityType: 'adverse_event', entityId: eventId, action: 'created', after: auditSnapshot(event), reason });
  return event;
}

/** Applies a correction to the current version of an event (clearing its attestation) and audits it with its reason. */
export async function applyEventCorrection(trx: Knex.Transaction, before: AdverseEvent, changes: EventFields, userId: string, reason: string): Promise<{ event: AdverseEvent; attestationCleared: boolean }> {
  const attestationCleared = before.attested !== null;
  if (!(await updateEvent(trx, before.id, before.version, changes, { clearAttestation: attestationCleared }))) {
    throw new ConflictError('Someone changed this adverse event after you opened it.', { current: await findEvent(trx, before.patientId, before.id) });
  }
  const after = (await findEvent(trx, before.patientId, before.id)) as AdverseEvent;
  await writeAudit(trx, {
    actorUserId: userId,
    trialId: before.trialId,
    entityType: 'adverse_event',
    entityId: before.id,
    action: 'corrected',
    before: auditSnapshot(before),
    after: { ...auditSnapshot(after), ...(attestationCleared ? { attestationCleared: true } : {}) },
    reason,
  });
  return { event: after, attestationCleared };
}

/** The onset is judged against the patient's enrolment, so the payload is parsed once the patient is loaded. */
export async function addEvent(db: Db, actor: Actor, patientId: string, body: unknown): Promise<EventWrite> {
  const { user, access } = actor;
  await visiblePatient(db, actor, patientId, writableSites(access));
  return db.transaction(async (trx) => {
    const patient = await visiblePatient(trx, actor, patientId, writableSites(access), true);
    const input = await parseBody(eventSchema(patient.enrolledOn), body);
    const event = await createEvent(trx, patient, { ...input, notes: input.notes ?? null }, user.id);
    const { paused } = await applySafetyRules(trx, { trialId: access.trialId, cohortId: patient.cohortId, actorUserId: user.id });
    return { ...(await view(trx, patient)), event, safety: { paused } };
  });
}

export async function correctEvent(db: Db, actor: Actor, patientId: string, eventId: string, body: unknown): Promise<EventWrite & { attestationCleared: boolean }> {
  const { user, access } = actor;
  await requireEvent(db, (await visiblePatient(db, actor, patientId, writableSites(access))).id, eventId);
  return db.transaction(async (trx) => {
    const patient = await visiblePatient(trx, actor, patientId, writableSites(access), true);
    const input = await parseBody(eventCorrectionSchema(patient.enrolledOn), body);
    const before = await requireEvent(trx, patient.id, eventId, true);
    if (before.version !== input.version) {
      throw new ConflictError('Someone changed this adverse event after you opened it. Review the current record and try again.', { current: before });
    }
    const changes: EventFields = {
      onsetOn: input.onsetOn ?? before.onsetOn,
      term: input.term ?? before.term,
      grade: input.grade === undefined ? before.grade : input.grade,
      attribution: input.attribution === undefined ? before.attribution : input.attribution,
      serious: input.serious ?? before.serious,
      outcome: input.outcome ?? before.outcome,
      notes: input.notes === undefined ? before.notes : input.notes,
    };
    if (EVENT_FIELDS.every((field) => changes[field] === before[field])) throw new InputError('Nothing to correct: the values are the same as the current record.');
    // The combined record must still hold together (grade 5 goes with a fatal outcome).
    await parseBody(eventSchema(patient.enrolledOn), changes);
    const { event, attestationCleared } = await applyEventCorrection(trx, before, changes, user.id, input.reason);
    const { paused } = await applySafetyRules(trx, { trialId: access.trialId, cohortId: patient.cohortId, actorUserId: user.id });
    return { ...(await view(trx, patient)), event, safety: { paused }, attestationCleared };
  });
}

/** Removing an event (entered for the wrong patient, say) needs the version and a reason; it can only lower the counts, so no rule is crossed by it. */
export async function removeEvent(db: Db, actor: Actor, patientId: string, eventId: string, body: unknown): Promise<PatientEventsView> {
  const { user, access } = actor;
  await requireEvent(db, (await visiblePatient(db, actor, patientId, writableSites(access))).id, eventId);
  return db.transaction(async (trx) => {
    const patient = await visiblePatient(trx, actor, patientId, writableSites(access), true);
    const input = await parseBody(eventRemovalSchema, body);
    const before = await requireEvent(trx, patient.id, eventId, true);
    if (before.version !== input.version || !(await deleteEvent(trx, eventId, input.version))) {
      throw new ConflictError('Someone changed this adverse event after you opened it. Review the current record and try again.', { current: before });
    }
    await writeAudit(trx, { actorUserId: user.id, trialId: access.trialId, entityType: 'adverse_event', entityId: eventId, action: 'removed', before: auditSnapshot(before), reason: input.reason });
    return view(trx, patient);
  });
}

export const eventAttestationMeaning = (event: Pick<AdverseEvent, 'studyId' | 'term' | 'onsetOn'>) =>
  `I attest that the adverse event "${event.term}" with onset on ${event.onsetOn} recorded for ${event.studyId} is accurate and complete`;

/** The investigator of the patient's site signs the recorded event (a password entered for this event's attestation). */
export async function attestEvent(db: Db, actor: Actor, patientId: string, eventId: string, body: unknown, session: SigningSession) {
  const { user, access } = actor;
  const patient = await visiblePatient(db, actor, patientId, siteScope(access));
  await requireEvent(db, patient.id, eventId);
  const isSiteInvestigator = await holdsRoleAtSite(db, { trialId: access.trialId, userId: user.id, role: 'investigator', siteId: patient.siteId });
  if (!isSiteInvestigator) throw new ForbiddenError('Only the investigator of the patient’s site can attest its adverse events.');
  const { version } = await parseBody(eventAttestationSchema, body);
  return db.transaction(async (trx) => {
    const current = await requireEvent(trx, patient.id, eventId, true);
    if (current.version !== version) throw new ConflictError('The adverse event changed since you opened it. Reload and check it before attesting.', { current });
    if (current.attested) throw new ConflictError(`This adverse event of ${current.studyId} is already attested.`, { current });
    const signature = await recordSignature(trx, {
      trialId: access.trialId,
      signer: { id: user.id, email: user.email },
      session,
      // The password entered for this event's attestation, used once.
      intent: { action: 'attestation', subjectId: current.id },
      meaning: eventAttestationMeaning(current),
      subjectType: 'attestation',
      subjectId: current.id,
      content: { adverseEventId: current.id, patientId: patient.id, version: current.version, ...fieldsOf(current) },
    });
    await setEventAttestation(trx, current.id, current.version, signature.id);
    const after = (await findEvent(trx, patient.id, current.id)) as AdverseEvent;
    await writeAudit(trx, {
      actorUserId: user.id,
      trialId: access.trialId,
      entityType: 'adverse_event',
      entityId: current.id,
      action: 'attested',
      before: auditSnapshot(current),
      after: auditSnapshot(after),
    });
    return { event: after, signature };
  });
}

/** One page of the trial's events at the sites the caller may see. */
export async function trialEvents(db: Db, actor: Actor, query: EventListQuery) {
  const result = await listEvents(db, actor.access.trialId, siteScope(actor.access), query);
  return { ...result, page: query.page, pageSize: query.pageSize };
}
