/**
 * Patients and outcomes, as a site coordinator or investigator works with them: enrol at one's own
 * sites, record the outcome, correct it with a reason, attest it with an electronic signature.
 * Every write runs in the caller's transaction, writes exactly one audit row for the patient, and
 * then applies the accrual rules (stages, the interim pause). The functions taking a transaction
 * are composable: the CSV import calls them row by row.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import { ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { siteScope, writableSites, type Actor } from '../auth/access.js';
import { recordSignature, type SigningSession } from '../signatures/signatures.js';
import { currentDesign } from '../designs/index.js';
import { countCounting } from '../evaluation/index.js';
import { lockCohort, trialCode, trialFacts, type TrialFacts } from '../trials/index.js';
import { holdsRoleAtSite } from '../people/index.js';
import { entityHistory } from '../audit/index.js';
import {
  attestationMeaning,
  attestationSchema,
  isRecorded,
  latestToday,
  OUTCOME_FIELDS,
  outcomeSchema,
  type EnrolInput,
  type ListQuery,
  type OutcomeInput,
} from './patients.schema.js';
import {
  findPatient,
  findPatientByStudyId,
  insertPatient,
  listPatients,
  nextEnrolmentSeq,
  setAttestation,
  updateOutcome,
  type OutcomeFields,
  type Patient,
} from './patients.repository.js';
import { applyAccrualRules, assertCohortEnrolling, type AccrualOutcome } from './accrual-rules.js';
import { emit, type Hooks } from '../hooks.js';


/** What the audit trail keeps of a patient: the identity and the outcome, never more. */
export function auditSnapshot(p: Patient) {
  return {
    studyId: p.studyId,
    siteCode: p.siteCode,
    cohortCode: p.cohortCode,
    enrolledOn: p.enrolledOn,
    stage: p.stage,
    outcome: p.outcome,
    bestOverallResponse: p.bestOverallResponse,
    responseAssessedOn: p.responseAssessedOn,
    evaluable: p.evaluable,
    notEvaluableReason: p.notEvaluableReason,
    attestationSignatureId: p.attested?.signatureId ?? null,
  };
}

async function requireFacts(db: Db | Knex.Transaction, trialId: string): Promise<TrialFacts> {
  const facts = await trialFacts(db, trialId);
  if (!facts) throw new NotFoundError('The trial');
  return facts;
}

/** One page of the trial's patients the actor may see, with the sites and cohorts the filters and the enrolment form offer. */
export async function listForUser(db: Db, actor: Actor, query: ListQuery) {
  const facts = await requireFacts(db, actor.access.trialId);
  const scope = siteScope(actor.access);
  const result = await listPatients(db, actor.access.trialId, scope, query);
  return {
    ...result,
    page: query.page,
    pageSize: query.pageSize,
    sites: facts.sites.filter((s) => scope === 'all' || scope.includes(s.id)),
    enrolSites: facts.sites.filter((s) => writableSites(actor.access).includes(s.id)),
    cohorts: facts.cohorts,
  };
}


/** A patient the user may see (404 otherwise, so other sites' records do not leak). */
export async function requireVisiblePatient(db: Db | Knex.Transaction, actor: Actor, patientId: string, options: { forUpdate?: boolean } = {}): Promise<Patient> {
  const patient = /^[0-9a-f-]{36}$/i.test(patientId) ? await findPatient(db, actor.access.trialId, patientId, siteScope(actor.access), options) : undefined;
  if (!patient) throw new NotFoundError('The patient');
  return patient;
}

function requireWritable(actor: Actor, patient: Patient): void {
  if (!writableSites(actor.access).includes(patient.siteId)) throw new ForbiddenError('Outcomes are recorded by the coordinator or investigator of the patient’s site.');
}

export type EnrolRequest = EnrolInput & Partial<OutcomeFields>;

/**
 * Enrols one patient, optionally with an outcome already known (the CSV import), and applies the
 * accrual rules. The caller owns the transaction.
 */
export async function enrolPatient(
  trx: Knex.Transaction,
  hooks: Hooks,
  actor: Actor,
  input: EnrolRequest,
  facts?: TrialFacts,
): Promise<{ patient: Patient; accrual: AccrualOutcome }> {
  const trialId = actor.access.trialId;
  const trial = facts ?? (await requireFacts(trx, trialId));
  const site = trial.sites.find((s) => s.id === input.siteId);
  if (!site || !writableSites(actor.access).includes(site.id)) throw new NotFoundError('The site');
  const studyId = input.studyId.trim().toUpperCase();
  if (!studyId.startsWith(`${site.code}-`)) {
    throw new InputError('The study ID must start with the site code.', { studyId: `A patient of ${site.code} has a study ID starting "${site.code}-".` });
  }
  let cohort = input.cohortId ? trial.cohorts.find((c) => c.id === input.cohortId) : undefined;
  if (!input.cohortId && trial.cohorts.length === 1) cohort = trial.cohorts[0];
  if (!cohort) {
    throw new InputError('Choose the cohort.', { cohortId: input.cohortId ? 'This cohort is not part of the trial.' : 'This trial has several cohorts: choose one.' });
  }
  if (input.enrolledOn > latestToday()) throw new InputError('Enrolment date cannot be in the future.', { enrolledOn: 'Enrolment date cannot be in the future.' });
  if (trial.startDate && input.enrolledOn < trial.startDate) {
    throw new InputError('Enrolment date is before the trial started.', { enrolledOn: `The trial started on ${trial.startDate}; enrolment cannot be earlier.` });
  }
  const outcome = {
    outcome: input.outcome ?? 'pending',
    bestOverallResponse: input.bestOverallResponse ?? null,
    responseAssessedOn: input.responseAssessedOn ?? null,
    evaluable: input.evaluable ?? true,
    notEvaluableReason: input.notEvaluableReason ?? null,
  } satisfies OutcomeFields;
  if (outcome.responseAssessedOn && outcome.responseAssessedOn < input.enrolledOn) {
    throw new InputError('The assessment cannot be before enrolment.', { responseAssessedOn: 'The assessment cannot be before enrolment.' });
  }

  const locked = await lockCohort(trx, cohort.id);
  if (!locked) throw new NotFoundError('The cohort');
  const design = assertCohortEnrolling(locked, await currentDesign(trx, cohort.id));
  if (await findPatientByStudyId(trx, trialId, studyId)) {
    throw new ConflictError(`Study ID ${studyId} is already used in this trial.`, { fields: { studyId: `${studyId} is already used in this trial.` } });
  }
  const enrolmentSeq = await nextEnrolmentSeq(trx, cohort.id);
  // Stage 1 holds the first n1 counting patients; the newcomer is last in enrolment order.
  const stage: 1 | 2 = design.n1 === null || (await countCounting(trx, cohort.id, design.analysisPopulation)) < design.n1 ? 1 : 2;
  const patientId = await insertPatient(trx, {
    trialId,
    cohortId: cohort.id,
    siteId: site.id,
    studyId,
    enrolledOn: input.enrolledOn,
    enrolmentSeq,
    stage,
    ...outcome,
    createdBy: actor.user.id,
  }).catch((error: { code?: string }) => {
    if (error.code === '23505') throw new ConflictError(`Study ID ${studyId} is already used in this trial.`, { fields: { studyId: `${studyId} is already used in this trial.` } });
    throw error;
  });
  const created = (await findPatient(trx, trialId, patientId, 'all')) as Patient;
  await writeAudit(trx, {
    actorUserId: actor.user.id,
    trialId,
    entityType: 'patient',
    entityId: patientId,
    action: 'enrolled',
    after: auditSnapshot(created),
  });
  const accrual = await applyAccrualRules(trx, { trialId, trialCode: trial.code, cohortId: cohort.id, actorUserId: actor.user.id });
  await emit(trx, hooks.patientWritten, { trialId, cohortId: cohort.id, patientId, action: 'enrolled', actorUserId: actor.user.id });
  return { patient: (await findPatient(trx, trialId, patientId, 'all')) as Patient, accrual };
}

export async function enrol(db: Db, hooks: Hooks, actor: Actor, input: EnrolInput) {
  return db.transaction((trx) => enrolPatient(trx, hooks, actor, input));
}

export type OutcomeChange = {
  patient: Patient;
  changed: boolean;
  correction: boolean;
  attestationCleared: boolean;
  accrual: AccrualOutcome;
};

function fieldsOf(p: OutcomeFields): OutcomeFields {
  return {
    outcome: p.outcome,
    bestOverallResponse: p.bestOverallResponse,
    responseAssessedOn: p.responseAssessedOn,
    evaluable: p.evaluable,
    notEvaluableReason: p.notEvaluableReason,
  };
}

/**
 * Records or corrects a patient's outcome. A change to an outcome already recorded is a correction
 * and needs a reason; a stale version gets 409 with the current record; an attested outcome that
 * changes loses its attestation.
 */
export async function recordOutcome(
  trx: Knex.Transaction,
  hooks: Hooks,
  actor: Actor,
  patientId: string,
  input: OutcomeInput,
  options: { trialCode?: string; reasonField?: string } = {},
): Promise<OutcomeChange> {
  const before = await requireVisiblePatient(trx, actor, patientId, { forUpdate: true });
  requireWritable(actor, before);
  if (input.version !== before.version) {
    throw new ConflictError('Someone else changed this patient since you opened it. Compare and reload before saving.', { current: before });
  }
  const next = fieldsOf(input);
  if (next.responseAssessedOn && next.responseAssessedOn < before.enrolledOn) {
    throw new InputError('The assessment cannot be before enrolment.', { responseAssessedOn: `The patient was enrolled on ${before.enrolledOn}; the assessment cannot be earlier.` });
  }
  if (next.responseAssessedOn && next.responseAssessedOn > latestToday()) {
    throw new InputError('The assessment date cannot be in the future.', { responseAssessedOn: 'The assessment date cannot be in the future.' });
  }
  const previous = fieldsOf(before);
  const changed = OUTCOME_FIELDS.some((field) => previous[field] !== next[field]);
  const none = { paused: false, continuesAtRisk: false };
  if (!changed) return { patient: before, changed: false, correction: false, attestationCleared: false, accrual: none };
  const correction = isRecorded(previous);
  if (correction && !input.reason) {
    const field = options.reasonField ?? 'reason';
    throw new InputError('Changing a recorded outcome is a correction: give the reason.', { [field]: 'A correction needs a reason.' });
  }
  const attestationCleared = before.attested !== null;
  const trialId = actor.access.trialId;
  if (!(await updateOutcome(trx, before.id, before.version, next, { clearAttestation: attestationCleared }))) {
    throw new ConflictError('Someone else changed this patient since you opened it. Compare and reload before saving.', {
      current: await findPatient(trx, trialId, before.id, siteScope(actor.access)),
    });
  }
  const after = (await findPatient(trx, trialId, before.id, 'all')) as Patient;
  const action = correction ? 'outcome_corrected' : 'outcome_recorded';
  await writeAudit(trx, {
    actorUserId: actor.user.id,
    trialId,
    entityType: 'patient',
    entityId: before.id,
    action,
    before: auditSnapshot(before),
    after: { ...auditSnapshot(after), ...(attestationCleared ? { attestationCleared: true } : {}) },
    reason: input.reason ?? null,
  });
  const code = options.trialCode ?? (await trialCode(trx, trialId));
  if (code === undefined) throw new NotFoundError('The trial');
  const accrual = await applyAccrualRules(trx, {
    trialId,
    trialCode: code,
    cohortId: before.cohortId,
    actorUserId: actor.user.id,
    evaluabilityChanged: previous.evaluable !== next.evaluable,
  });
  await emit(trx, hooks.patientWritten, { trialId, cohortId: before.cohortId, patientId: before.id, action, actorUserId: actor.user.id });
  return { patient: (await findPatient(trx, trialId, before.id, 'all')) as Patient, changed: true, correction, attestationCleared, accrual };
}

/** The payload is judged only once the patient is known to be visible: another site's patient answers 404 whatever is sent. */
export async function changeOutcome(db: Db, hooks: Hooks, actor: Actor, patientId: string, body: unknown): Promise<OutcomeChange> {
  await requireVisiblePatient(db, actor, patientId);
  const input = await parseBody(outcomeSchema, body);
  return db.transaction((trx) => recordOutcome(trx, hooks, actor, patientId, input));
}

/** The investigator of the patient's site signs the recorded outcome (a password entered for this patient's attestation). */
export async function attest(db: Db, hooks: Hooks, actor: Actor, patientId: string, body: unknown, session: SigningSession) {
  const trialId = actor.access.trialId;
  const patient = await requireVisiblePatient(db, actor, patientId);
  const isSiteInvestigator = await holdsRoleAtSite(db, { trialId, userId: actor.user.id, role: 'investigator', siteId: patient.siteId });
  if (!isSiteInvestigator) throw new ForbiddenError('Only the investigator of the patient’s site can attest the outcome.');
  const { version } = await parseBody(attestationSchema, body);
  return db.transaction(async (trx) => {
    const current = await requireVisiblePatient(trx, actor, patientId, { forUpdate: true });
    if (current.version !== version) {
      throw new ConflictError('The outcome changed since you opened it. Reload and check it before attesting.', { current });
    }
    if (current.outcome === 'pending' && current.evaluable) throw new ConflictError(`There is no outcome to attest for ${current.studyId} yet.`, { current });
    if (current.attested) throw new ConflictError(`The outcome of ${current.studyId} is already attested.`, { current });
    const content = { patientId: current.id, studyId: current.studyId, version: current.version, ...fieldsOf(current) };
    const signature = await recordSignature(trx, {
      trialId,
      signer: { id: actor.user.id, email: actor.user.email },
      session,
      intent: { action: 'attestation', subjectId: current.id },
      meaning: attestationMeaning(current.studyId),
      subjectType: 'attestation',
      subjectId: current.id,
      content,
    });
    await setAttestation(trx, current.id, current.version, signature.id);
    const after = (await findPatient(trx, trialId, current.id, 'all')) as Patient;
    await writeAudit(trx, {
      actorUserId: actor.user.id,
      trialId,
      entityType: 'patient',
      entityId: current.id,
      action: 'outcome_attested',
      before: auditSnapshot(current),
      after: auditSnapshot(after),
    });
    await emit(trx, hooks.patientWritten, { trialId, cohortId: current.cohortId, patientId: current.id, action: 'outcome_attested', actorUserId: actor.user.id });
    return { patient: after, signature };
  });
}

export async function history(db: Db, actor: Actor, patientId: string) {
  const patient = await requireVisiblePatient(db, actor, patientId);
  return { patient, entries: await entityHistory(db, 'patient', patient.id) };
}
