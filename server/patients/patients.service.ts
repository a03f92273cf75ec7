/**
 * Patients and outcomes, as a site coordinator or investigator works with them: enrol at one's own
 * sites, record the outcome, correct it with a reason, attest it with an electronic signature.
 * Every write runs in the caller's transaction, writes exactly one audit row for the patient, and
 * then applies the accrual rules (stages, the interim pause). The functions taking a transaction
 * are composable: the CSV import writes known patients' changes together (`writeOutcomes`) and
 * enrols new ones together (`enrolPatients`), by the same rules as the forms.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { currentDataVersion, inOneSnapshot, keptFrozen, trialDataVersion, VersionedCache } from '../db/trial-versions.js';
import { writeAudit, writeAudits } from '../audit/audit.js';
import { AppError, ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { siteScope, writableSites, type Actor } from '../auth/access.js';
import { recordSignature, type SigningSession } from '../signatures/signatures.js';
import { currentDesign, type LockedDesign } from '../designs/index.js';
import { countCounting, countsToward } from '../evaluation/index.js';
import { lockCohort, trialFacts, type Cohort, type TrialFacts } from '../trials/index.js';
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
  findPatientsByStudyIds,
  insertPatients,
  nextEnrolmentSeq,
  patientPage,
  patientsInOrder,
  setAttestation,
  updateOutcomes,
  type NewPatient,
  type OutcomeFields,
  type ListedPatient,
  type Patient,
  type PatientPage,
} from './patients.repository.js';
import { applyAccrualRules, assertCohortEnrolling, stageOneComplete, type AccrualOutcome } from './accrual-rules.js';
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

// Which patients a page holds (and the counts above it) reads every patient of the selection: kept per data version of the
// trial, with the page's rows. Everything in a row is the trial's data, which bumps the version, except a signer's current
// name, shown only for attestations signed before printed names were recorded with each signature.
// With each page, the answers made from it, by the sites the viewer may enrol at (the one part of an answer that varies within a site scope), frozen.
const pages = new VersionedCache<{ facts: TrialFacts; page: PatientPage; patients: Patient[]; answers: Map<string, PatientList> }>(200);

export type PatientList = ReturnType<typeof patientList>;

/** One page of the trial's patients the actor may see, with the sites and cohorts the filters and the enrolment form offer. */
export async function listForUser(db: Db, actor: Actor, query: ListQuery): Promise<PatientList> {
  const { trialId } = actor.access;
  const scope = siteScope(actor.access);
  const key = JSON.stringify([trialId, scope, query]);
  const kept =
    pages.get(key, await currentDataVersion(db, actor.access)) ??
    (await inOneSnapshot(db, async (trx) => {
      const version = await trialDataVersion(trx, trialId);
      const page = await patientPage(trx, trialId, scope, query);
      const computed = { facts: await requireFacts(trx, trialId), page, patients: await patientsInOrder(trx, page.ids), answers: new Map<string, PatientList>() };
      pages.set(key, version, computed);
      return computed;
    }));
  return keptFrozen(kept.answers, JSON.stringify(writableSites(actor.access)), () => patientList(actor, query, scope, kept));
}

function patientList(actor: Actor, query: ListQuery, scope: ReturnType<typeof siteScope>, { facts, page, patients }: { facts: TrialFacts; page: PatientPage; patients: Patient[] }) {
  return {
    patients: patients.map(({ derivation: _reasoning, ...listed }): ListedPatient => listed),
    total: page.total,
    counts: page.counts,
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
export type Enrolled = { patient: Patient; accrual: AccrualOutcome };

/** What an enrolment request says once checked against the trial alone (no database): 4xx with the field otherwise. */
function checkEnrolment(trial: TrialFacts, actor: Actor, input: EnrolRequest) {
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
  return { site, cohortId: cohort.id, studyId, enrolledOn: input.enrolledOn, outcome };
}

/** Where a cohort stands while requests are enrolled in order: its state, the next sequence number, the patients counted. */
type CohortState = { cohort: Pick<Cohort, 'code' | 'status' | 'safetyPause'>; design: LockedDesign | undefined; nextSeq: number; counted: number };

const duplicate = (studyId: string) => new ConflictError(`Study ID ${studyId} is already used in this trial.`, { fields: { studyId: `${studyId} is already used in this trial.` } });

/** Runs `check`, turning a refusal (a 4xx) into a result; anything else is a fault and is thrown. */
function attempt<T>(check: () => T): T | { error: AppError } {
  try {
    return check();
  } catch (error) {
    if (error instanceof AppError && error.status < 500) return { error };
    throw error;
  }
}

/**
 * Enrols patients in the order given, optionally with an outcome already known (the CSV import),
 * and applies the accrual rules; the caller owns the transaction. Each request is checked as the
 * form checks it, against its cohort as the requests before it left it: stage 1 holds the first n1
 * counting patients, and once a request completes stage 1 the interim pause refuses the requests
 * after it (unless the design lets accrual continue at risk), exactly as one enrolment after
 * another would. A refused request is answered with its reason and leaves no trace; the accepted
 * ones are written in a few statements: the patients, their audit rows, the accrual rules once per
 * cohort, one re-derivation of them all.
 */
export async function enrolPatients(trx: Knex.Transaction, hooks: Hooks, actor: Actor, requests: readonly EnrolRequest[], facts?: TrialFacts): Promise<Array<Enrolled | { error: AppError }>> {
  const trialId = actor.access.trialId;
  const trial = facts ?? (await requireFacts(trx, trialId));
  const checked = requests.map((request) => attempt(() => checkEnrolment(trial, actor, request)));
  const valid = checked.filter((c): c is ReturnType<typeof checkEnrolment> => !('error' in c));

  // Cohorts are locked in one order (by id), so two enrolments into the same cohorts cannot deadlock.
  const states = new Map<string, CohortState | undefined>();
  for (const cohortId of [...new Set(valid.map((c) => c.cohortId))].sort()) {
    const locked = await lockCohort(trx, cohortId);
    const design = locked && (await currentDesign(trx, cohortId));
    states.set(
      cohortId,
      locked && {
        cohort: locked,
        design,
        nextSeq: await nextEnrolmentSeq(trx, cohortId),
        counted: design ? await countCounting(trx, cohortId, design.analysisPopulation) : 0,
      },
    );
  }
  const taken = new Set((await findPatientsByStudyIds(trx, trialId, valid.map((c) => c.studyId))).keys());

  const accepted: Array<{ index: number; row: NewPatient }> = [];
  // Refusals now; the accepted requests get their patient once written.
  const results: Array<Enrolled | { error: AppError }> = [];
  checked.forEach((c, index) => {
    if ('error' in c) {
      results[index] = c;
      return;
    }
    const state = states.get(c.cohortId);
    if (!state) {
      results[index] = { error: new NotFoundError('The cohort') };
      return;
    }
    const refusal = attempt(() => {
      const design = assertCohortEnrolling(state.cohort, state.design);
      if (taken.has(c.studyId)) throw duplicate(c.studyId);
      // Stage 1 holds the first n1 counting patients; the newcomer is last in enrolment order.
      const stage: 1 | 2 = design.n1 === null || state.counted < design.n1 ? 1 : 2;
      taken.add(c.studyId);
      accepted.push({
        index,
        row: { trialId, cohortId: c.cohortId, siteId: c.site.id, studyId: c.studyId, enrolledOn: c.enrolledOn, enrolmentSeq: state.nextSeq, stage, ...c.outcome, createdBy: actor.user.id },
      });
      state.nextSeq += 1;
      if (countsToward(c.outcome, design.analysisPopulation)) state.counted += 1;
      // The interim pause applies from here on, as the accrual rules below will record it.
      if (stageOneComplete(design, state.cohort.status, state.counted)) state.cohort = { ...state.cohort, status: 'interim_review' };
    });
    if (refusal !== undefined) results[index] = refusal;
  });
  if (accepted.length === 0) return results;

  const ids = await insertPatients(
    trx,
    accepted.map((a) => a.row),
  ).catch((error: { code?: string; detail?: string }) => {
    if (error.code === '23505') throw duplicate(/\(trial_id, study_id\)=\([^,]+, ([^)]+)\)/.exec(error.detail ?? '')?.[1] ?? 'of a patient');
    throw error;
  });
  await writeAudits(
    trx,
    (await patientsInOrder(trx, ids)).map((created) => ({ actorUserId: actor.user.id, trialId, entityType: 'patient', entityId: created.id, action: 'enrolled', after: auditSnapshot(created) })),
  );
  const accrual = new Map<string, AccrualOutcome>();
  for (const cohortId of new Set(accepted.map((a) => a.row.cohortId))) {
    accrual.set(cohortId, await applyAccrualRules(trx, { trialId, trialCode: trial.code, cohortId, actorUserId: actor.user.id }));
  }
  await emit(trx, hooks.patientWritten, { trialId, patientIds: ids, action: 'enrolled', actorUserId: actor.user.id });
  const enrolled = await patientsInOrder(trx, ids);
  accepted.forEach((a, i) => {
    results[a.index] = { patient: enrolled[i], accrual: accrual.get(a.row.cohortId) as AccrualOutcome };
  });
  return results;
}

/** Enrols one patient (the form): the same rules as a batch of one, its refusal thrown. */
export async function enrolPatient(trx: Knex.Transaction, hooks: Hooks, actor: Actor, input: EnrolRequest, facts?: TrialFacts): Promise<Enrolled> {
  const [result] = await enrolPatients(trx, hooks, actor, [input], facts);
  if ('error' in result) throw result.error;
  return result;
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

/** An outcome change that passed every rule, against the patient as this transaction holds it (locked). */
export type OutcomePlan = {
  before: Patient;
  next: OutcomeFields;
  correction: boolean;
  attestationCleared: boolean;
  evaluabilityChanged: boolean;
  reason: string | null;
};

/**
 * The rules of an outcome change, the same for the form and the import: the actor's own site (403),
 * the version the change was made against (409 with the current record), the assessment date, and
 * a reason for a correction (a change to an outcome already recorded; `reasonField` names the
 * field in the error). Undefined when nothing would change.
 */
export function planOutcome(actor: Actor, before: Patient, input: OutcomeInput, reasonField = 'reason'): OutcomePlan | undefined {
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
  if (!OUTCOME_FIELDS.some((field) => previous[field] !== next[field])) return undefined;
  const correction = isRecorded(previous);
  if (correction && !input.reason) {
    throw new InputError('Changing a recorded outcome is a correction: give the reason.', { [reasonField]: 'A correction needs a reason.' });
  }
  return {
    before,
    next,
    correction,
    attestationCleared: before.attested !== null,
    evaluabilityChanged: previous.evaluable !== next.evaluable,
    reason: input.reason ?? null,
  };
}

/**
 * Writes planned outcome changes of the actor's trial together: one update and one audit
 * statement for all of them (one audit row each, with before and after), the accrual rules once
 * per cohort, and one re-derivation per kind of write (recorded, corrected). The patients are
 * locked by the caller, so a version that moved on is a conflict (409), which rolls it all back.
 * Each change is audited at `plan.before.stage`, the stage it met (an import replays the stages its
 * earlier rows moved). Answers the accrual outcome of each cohort.
 */
export async function writeOutcomes(
  trx: Knex.Transaction,
  hooks: Hooks,
  actor: Actor,
  plans: readonly OutcomePlan[],
  options: { trialCode?: string } = {},
): Promise<Map<string, AccrualOutcome>> {
  const trialId = actor.access.trialId;
  const written = await updateOutcomes(
    trx,
    plans.map((plan) => ({ patientId: plan.before.id, version: plan.before.version, fields: plan.next, clearAttestation: plan.attestationCleared })),
  );
  const after = new Map(written.map((patient) => [patient.id, patient]));
  const stale = plans.find((plan) => !after.has(plan.before.id));
  if (stale) {
    throw new ConflictError('Someone else changed this patient since you opened it. Compare and reload before saving.', {
      current: await findPatient(trx, trialId, stale.before.id, siteScope(actor.access)),
    });
  }
  const actionOf = (plan: OutcomePlan) => (plan.correction ? 'outcome_corrected' : 'outcome_recorded');
  await writeAudits(
    trx,
    plans.map((plan) => ({
      actorUserId: actor.user.id,
      trialId,
      entityType: 'patient',
      entityId: plan.before.id,
      action: actionOf(plan),
      before: auditSnapshot(plan.before),
      // The write leaves the stage where the change met it (the accrual rules below may move it, after the audit row).
      after: { ...auditSnapshot(after.get(plan.before.id) as Patient), stage: plan.before.stage, ...(plan.attestationCleared ? { attestationCleared: true } : {}) },
      reason: plan.reason,
    })),
  );
  const accrual = new Map<string, AccrualOutcome>();
  for (const cohortId of new Set(plans.map((plan) => plan.before.cohortId))) {
    const inCohort = plans.filter((plan) => plan.before.cohortId === cohortId);
    accrual.set(
      cohortId,
      await applyAccrualRules(trx, {
        trialId,
        trialCode: options.trialCode,
        cohortId,
        actorUserId: actor.user.id,
        evaluabilityChanged: inCohort.some((plan) => plan.evaluabilityChanged),
      }),
    );
  }
  for (const action of ['outcome_recorded', 'outcome_corrected'] as const) {
    const these = plans.filter((plan) => actionOf(plan) === action);
    if (these.length === 0) continue;
    const patients = these.map((plan) => after.get(plan.before.id) as Patient);
    await emit(trx, hooks.patientWritten, { trialId, patientIds: patients.map((p) => p.id), action, actorUserId: actor.user.id, written: patients });
  }
  return accrual;
}

/**
 * Records or corrects the outcome of `before`, the patient as the caller read it, visible and locked
 * in this transaction (`planOutcome`'s rules, then `writeOutcomes`); an attested outcome that
 * changes loses its attestation. Answers the patient as stored after the re-derivation.
 */
async function recordOutcome(trx: Knex.Transaction, hooks: Hooks, actor: Actor, before: Patient, input: OutcomeInput): Promise<OutcomeChange> {
  const plan = planOutcome(actor, before, input);
  if (!plan) return { patient: before, changed: false, correction: false, attestationCleared: false, accrual: { paused: false, continuesAtRisk: false } };
  const accrual = await writeOutcomes(trx, hooks, actor, [plan]);
  return {
    patient: (await findPatient(trx, actor.access.trialId, before.id, 'all')) as Patient,
    changed: true,
    correction: plan.correction,
    attestationCleared: plan.attestationCleared,
    accrual: accrual.get(before.cohortId) as AccrualOutcome,
  };
}

/**
 * The payload is judged only once the patient is known to be visible: another site's patient
 * answers 404 whatever is sent. The patient is read once, locked, in the writing transaction (bad
 * input rolls it back, having written nothing).
 */
export async function changeOutcome(db: Db, hooks: Hooks, actor: Actor, patientId: string, body: unknown): Promise<OutcomeChange> {
  return db.transaction(async (trx) => {
    const locked = await requireVisiblePatient(trx, actor, patientId, { forUpdate: true });
    const input = await parseBody(outcomeSchema, body);
    return recordOutcome(trx, hooks, actor, locked, input);
  });
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
    await emit(trx, hooks.patientWritten, { trialId, patientIds: [current.id], action: 'outcome_attested', actorUserId: actor.user.id });
    return { patient: after, signature };
  });
}

export async function history(db: Db, actor: Actor, patientId: string) {
  const patient = await requireVisiblePatient(db, actor, patientId);
  return { patient, entries: await entityHistory(db, 'patient', patient.id) };
}
