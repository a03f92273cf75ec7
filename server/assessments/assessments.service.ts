/**
 * Timepoint assessments and the outcome derived from them. Every change to an assessment
 * re-derives the patient's best overall response in the same transaction: where the protocol
 * derives outcomes, the outcome follows (audited as a derived update); where outcomes are entered,
 * the entered outcome is never overwritten, but a disagreement is flagged and audited.
 */
import type { Knex } from 'knex';
import type { Listener, PatientWrite, ProtocolSettingsChange } from '../hooks.js';
import type { Db } from '../db/knex.js';
import { writeAudit, writeAudits } from '../audit/audit.js';
import { ConflictError, InputError, NotFoundError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { siteScope, writableSites, type Actor } from '../auth/access.js';
import { assessmentCorrectionSchema, assessmentRemovalSchema, assessmentSchema } from './assessments.schema.js';
import { findProtocolSettings, listTrialSites, type ProtocolSettings } from '../trials/index.js';
import {
  findPatient,
  findPatientsByIds,
  listAttentionCandidates,
  listPatientsOfTrial,
  storeDerivations,
  storeDerivedOutcomes,
  type OutcomeColumns,
  type Patient,
} from '../patients/index.js';
import {
  deleteAssessment,
  findAssessment,
  findAssessmentOn,
  insertAssessment,
  listAssessments,
  listAssessmentsOfPatients,
  listAssessmentsOfTrial,
  updateAssessment,
  type Assessment,
} from './assessments.repository.js';
import { deriveBestOverallResponse, disagreesWithDerivation, longDate, type AttentionItem, type Derivation, type DerivationSettings } from './derivation.js';

export const DISAGREES_FLAG = 'disagrees_with_derivation';

/** Who a re-derivation is audited for, and on which day it is judged. */
export type DerivationContext = {
  actorUserId?: string | null;
  today?: string;
  /**
   * Where outcomes are derived, a patient without any assessment keeps the outcome it has (an
   * outcome entered before the protocol switched to derived ones is not wiped). Changes to the
   * assessments themselves set this, so removing the last one returns the outcome to pending.
   */
  fromAssessmentChange?: boolean;
};

/** The protocol's outcome rules: where outcomes come from, and how RECIST 1.1 is configured. */
type TrialSettings = { outcomeSource: ProtocolSettings['outcomeSource'] } & DerivationSettings;

async function findTrialSettings(db: Db | Knex.Transaction, trialId: string): Promise<TrialSettings | undefined> {
  const protocol = await findProtocolSettings(db, trialId);
  return (
    protocol && {
      outcomeSource: protocol.outcomeSource,
      confirmationRequired: protocol.confirmationRequired,
      confirmationMinDays: protocol.confirmationMinDays,
      sdMinDays: protocol.sdMinDays,
      neBetweenResponses: protocol.neBetweenResponses,
      assessmentIntervalDays: protocol.assessmentIntervalDays,
    }
  );
}

function derivationFor(patient: Patient, assessments: Assessment[], settings: TrialSettings, today?: string): Derivation {
  return deriveBestOverallResponse({
    enrolledOn: patient.enrolledOn,
    assessments: assessments.map((a) => ({ id: a.id, date: a.date, response: a.response })),
    settings: {
      confirmationRequired: settings.confirmationRequired,
      confirmationMinDays: settings.confirmationMinDays,
      sdMinDays: settings.sdMinDays,
      neBetweenResponses: settings.neBetweenResponses,
      assessmentIntervalDays: settings.assessmentIntervalDays,
    },
    today,
    entered: settings.outcomeSource === 'entered' ? { outcome: patient.outcome, bestOverallResponse: patient.bestOverallResponse } : undefined,
  });
}

function derivedOutcome(derivation: Derivation): OutcomeColumns {
  if (derivation.responder === null) return { outcome: 'pending', bestOverallResponse: null, responseAssessedOn: null };
  return {
    outcome: derivation.responder ? 'responder' : 'non_responder',
    bestOverallResponse: derivation.bestOverallResponse,
    responseAssessedOn: derivation.basisDate,
  };
}

type Subject = { patient: Patient; assessments: Assessment[] };

/**
 * Derives each patient and applies the results in a few statements: the stored derivation, the
 * outcome where the protocol derives it, or the disagreement flag where outcomes are entered; every
 * change to an outcome or a flag gets its audit row.
 */
async function applyDerivations(trx: Knex.Transaction, subjects: Subject[], settings: TrialSettings, context: DerivationContext): Promise<Derivation[]> {
  const derivations = subjects.map(({ patient, assessments }) => derivationFor(patient, assessments, settings, context.today));
  const outcomes: Array<OutcomeColumns & { patientId: string }> = [];
  const flags: Array<string | null> = [];
  const audits: Array<{ patient: Patient; action: string; before: unknown; after: unknown }> = [];
  subjects.forEach(({ patient, assessments }, i) => {
    const derivation = derivations[i];
    let flag: string | null = null;
    if (settings.outcomeSource === 'derived' && (assessments.length > 0 || context.fromAssessmentChange)) {
      const before: OutcomeColumns = { outcome: patient.outcome, bestOverallResponse: patient.bestOverallResponse, responseAssessedOn: patient.responseAssessedOn };
      const after = derivedOutcome(derivation);
      if (before.outcome !== after.outcome || before.bestOverallResponse !== after.bestOverallResponse || before.responseAssessedOn !== after.responseAssessedOn) {
        outcomes.push({ patientId: patient.id, ...after });
        // The attestation signed the old outcome: it no longer stands.
        const attestation = patient.attested ? { attestationCleared: true, clearedAttestationSignatureId: patient.attested.signatureId } : {};
        audits.push({ patient, action: 'outcome_derived', before: { ...before, attestationSignatureId: patient.attested?.signatureId ?? null }, after: { ...after, ...attestation } });
      }
    } else if (disagreesWithDerivation({ outcome: patient.outcome, bestOverallResponse: patient.bestOverallResponse }, derivation)) {
      flag = DISAGREES_FLAG;
    }
    flags.push(flag);
    if (flag !== patient.outcomeFlag) {
      const compared = {
        entered: { outcome: patient.outcome, bestOverallResponse: patient.bestOverallResponse },
        derived: { responder: derivation.responder, bestOverallResponse: derivation.bestOverallResponse },
      };
      audits.push({ patient, action: flag ? 'flagged' : 'flag_cleared', before: { outcomeFlag: patient.outcomeFlag, ...compared }, after: { outcomeFlag: flag, ...compared } });
    }
  });
  await storeDerivations(
    trx,
    subjects.map(({ patient }, i) => ({
      patientId: patient.id,
      derivedBestOverallResponse: derivations[i].bestOverallResponse,
      derivedResponder: derivations[i].responder,
      derivation: derivations[i],
      outcomeFlag: flags[i],
    })),
  );
  await storeDerivedOutcomes(trx, outcomes);
  await writeAudits(
    trx,
    audits.map(({ patient, action, before, after }) => ({ actorUserId: context.actorUserId ?? null, trialId: patient.trialId, entityType: 'patient', entityId: patient.id, action, before, after })),
  );
  return derivations;
}

/**
 * Re-derives one patient's best overall response from their assessments and applies it (derived
 * outcome, or the disagreement flag). Call it inside the transaction of any change to the
 * patient's assessments or entered outcome.
 */
export async function recomputeDerivation(trx: Knex.Transaction, patientId: string, context: DerivationContext = {}): Promise<Derivation> {
  const [derivation] = await recomputeDerivations(trx, [patientId], context);
  return derivation;
}

/** The same for patients of one trial written together (an import's new patients), in a few statements; derivations in id order. */
export async function recomputeDerivations(
  trx: Knex.Transaction,
  patientIds: readonly string[],
  context: DerivationContext = {},
  written?: readonly Patient[],
): Promise<Derivation[]> {
  // The writer's own rows, locked in this transaction, spare a second read (in id order, as the read gives them); see PatientWrite.written for what is current in them.
  const patients = written ? [...written].sort((a, b) => (a.id < b.id ? -1 : 1)) : await findPatientsByIds(trx, patientIds, { forUpdate: true });
  if (patients.length !== new Set(patientIds).size) throw new NotFoundError('The patient');
  if (patients.length === 0) return [];
  const trialId = patients[0].trialId;
  if (patients.some((p) => p.trialId !== trialId)) throw new Error('recomputeDerivations: the patients belong to more than one trial');
  const settings = await findTrialSettings(trx, trialId);
  if (!settings) throw new NotFoundError('The trial');
  const assessments = await listAssessmentsOfPatients(trx, patients.map((p) => p.id));
  return applyDerivations(trx, patients.map((patient) => ({ patient, assessments: assessments.get(patient.id) ?? [] })), settings, context);
}

/** Re-derives every patient of a trial, for when the protocol's outcome settings change. */
export async function recomputeDerivationsForTrial(trx: Knex.Transaction, trialId: string, context: DerivationContext = {}): Promise<number> {
  const settings = await findTrialSettings(trx, trialId);
  if (!settings) throw new NotFoundError('The trial');
  const patients = await listPatientsOfTrial(trx, trialId, { forUpdate: true });
  const assessments = await listAssessmentsOfTrial(trx, trialId);
  await applyDerivations(
    trx,
    patients.map((patient) => ({ patient, assessments: assessments.get(patient.id) ?? [] })),
    settings,
    context,
  );
  return patients.length;
}

/** Listens to patient writes: an attestation changes no outcome, everything else re-derives. */
export const rederiveAfterPatientWrite: Listener<PatientWrite> = async (trx, write) => {
  if (write.action === 'outcome_attested') return;
  await recomputeDerivations(trx, write.patientIds, { actorUserId: write.actorUserId }, write.written);
};

/** Listens to changes of the protocol's outcome rules: every stored derivation (and, when derived, outcome) follows. */
export const rederiveTrialAfterSettingsChange: Listener<ProtocolSettingsChange> = async (trx, change) => {
  await recomputeDerivationsForTrial(trx, change.trialId, { actorUserId: change.actorUserId });
};

export type PatientSummary = Pick<
  Patient,
  'id' | 'studyId' | 'siteId' | 'enrolledOn' | 'outcome' | 'bestOverallResponse' | 'evaluable' | 'outcomeFlag' | 'derivedBestOverallResponse' | 'derivedResponder' | 'version'
>;

const summary = (p: Patient): PatientSummary => ({
  id: p.id,
  studyId: p.studyId,
  siteId: p.siteId,
  enrolledOn: p.enrolledOn,
  outcome: p.outcome,
  bestOverallResponse: p.bestOverallResponse,
  evaluable: p.evaluable,
  outcomeFlag: p.outcomeFlag,
  derivedBestOverallResponse: p.derivedBestOverallResponse,
  derivedResponder: p.derivedResponder,
  version: p.version,
});

/** A patient the caller may see: other sites answer 404, exactly like a patient that does not exist. */
async function visiblePatient(db: Db | Knex.Transaction, actor: Actor, patientId: string, sites: string[] | 'all', lock = false): Promise<Patient> {
  const patient = await findPatient(db, actor.access.trialId, patientId, 'all', { forUpdate: lock });
  if (!patient || (sites !== 'all' && !sites.includes(patient.siteId))) throw new NotFoundError('The patient');
  return patient;
}

async function settingsOf(db: Db | Knex.Transaction, trialId: string): Promise<TrialSettings> {
  const settings = await findTrialSettings(db, trialId);
  if (!settings) throw new NotFoundError('The trial');
  return settings;
}

export type AssessmentsView = {
  patient: PatientSummary;
  outcomeSource: TrialSettings['outcomeSource'];
  settings: Omit<TrialSettings, 'outcomeSource'>;
  assessments: Assessment[];
  derivation: Derivation;
};

async function view(db: Db | Knex.Transaction, trialId: string, patientId: string): Promise<AssessmentsView> {
  const patient = (await findPatient(db, trialId, patientId, 'all')) as Patient;
  const { outcomeSource, ...settings } = await settingsOf(db, trialId);
  const assessments = await listAssessments(db, patientId);
  // Read fresh, so time-dependent items (a confirmation now overdue) are current.
  const derivation = derivationFor(patient, assessments, { outcomeSource, ...settings });
  return { patient: summary(patient), outcomeSource, settings, assessments, derivation };
}

export async function listForPatient(db: Db, actor: Actor, patientId: string): Promise<AssessmentsView> {
  await visiblePatient(db, actor, patientId, siteScope(actor.access));
  return view(db, actor.access.trialId, patientId);
}

function duplicateDate(existing: Assessment): ConflictError {
  return new ConflictError(`This patient already has an assessment dated ${longDate(existing.date)}; correct that one instead.`, {
    fields: { date: 'An assessment with this date already exists for this patient.' },
    current: existing,
  });
}

const isUniqueViolation = (error: unknown) => (error as { code?: string })?.code === '23505';

export type NewAssessment = { date: string; response: Assessment['response']; notes: string | null };

/** Inserts one checked assessment of a locked patient and audits it; the caller re-derives. */
export async function createAssessment(trx: Knex.Transaction, patient: Patient, input: NewAssessment, userId: string, reason?: string): Promise<Assessment> {
  const existing = await findAssessmentOn(trx, patient.id, input.date);
  if (existing) throw duplicateDate(existing);
  let assessment: Assessment;
  try {
    assessment = await insertAssessment(trx, { patientId: patient.id, trialId: patient.trialId, ...input, createdBy: userId });
  } catch (error) {
    if (isUniqueViolation(error)) throw new ConflictError('An assessment with this date was just added for this patient.', { fields: { date: 'Already exists.' } });
    throw error;
  }
  await writeAudit(trx, { actorUserId: userId, trialId: patient.trialId, entityType: 'assessment', entityId: assessment.id, action: 'created', after: assessment, reason });
  return assessment;
}

/** Applies a correction to the current version of an assessment and audits it with its reason; the caller re-derives. */
export async function applyCorrection(trx: Knex.Transaction, before: Assessment, changes: NewAssessment, userId: string, reason: string): Promise<Assessment> {
  if (changes.date !== before.date) {
    const clash = await findAssessmentOn(trx, before.patientId, changes.date);
    if (clash) throw duplicateDate(clash);
  }
  const after = await updateAssessment(trx, before.id, before.version, changes);
  if (!after) throw new ConflictError('Someone changed this assessment after you opened it.', { current: await findAssessment(trx, before.patientId, before.id) });
  await writeAudit(trx, { actorUserId: userId, trialId: before.trialId, entityType: 'assessment', entityId: before.id, action: 'corrected', before, after, reason });
  return after;
}

/** The payload's dates are judged against the patient's enrolment, so it is parsed once the patient is loaded. */
export async function addAssessment(db: Db, actor: Actor, patientId: string, body: unknown): Promise<AssessmentsView & { assessment: Assessment }> {
  const { user, access } = actor;
  return db.transaction(async (trx) => {
    const patient = await visiblePatient(trx, actor, patientId, writableSites(access), true);
    const input = await parseBody(assessmentSchema(patient.enrolledOn), body);
    const assessment = await createAssessment(trx, patient, { date: input.date, response: input.response, notes: input.notes || null }, user.id);
    await recomputeDerivation(trx, patientId, { actorUserId: user.id, fromAssessmentChange: true });
    return { ...(await view(trx, access.trialId, patientId)), assessment };
  });
}

async function currentOrStale(trx: Knex.Transaction, patientId: string, assessmentId: string, version: number): Promise<Assessment> {
  const current = await findAssessment(trx, patientId, assessmentId);
  if (!current) throw new NotFoundError('The assessment');
  if (current.version !== version) {
    throw new ConflictError('Someone changed this assessment after you opened it. Review the current record and try again.', { current });
  }
  return current;
}

export async function correctAssessment(
  db: Db,
  actor: Actor,
  patientId: string,
  assessmentId: string,
  body: unknown,
): Promise<AssessmentsView & { assessment: Assessment }> {
  const { user, access } = actor;
  return db.transaction(async (trx) => {
    const patient = await visiblePatient(trx, actor, patientId, writableSites(access), true);
    if (!(await findAssessment(trx, patientId, assessmentId))) throw new NotFoundError('The assessment');
    const input = await parseBody(assessmentCorrectionSchema(patient.enrolledOn), body);
    const before = await currentOrStale(trx, patientId, assessmentId, input.version);
    const changes = {
      date: input.date ?? before.date,
      response: input.response ?? before.response,
      notes: input.notes === undefined ? before.notes : input.notes || null,
    };
    if (changes.date === before.date && changes.response === before.response && changes.notes === before.notes) {
      throw new InputError('Nothing to correct: the values are the same as the current record.');
    }
    const after = await applyCorrection(trx, before, changes, user.id, input.reason);
    await recomputeDerivation(trx, patientId, { actorUserId: user.id, fromAssessmentChange: true });
    return { ...(await view(trx, access.trialId, patientId)), assessment: after };
  });
}

export async function removeAssessment(db: Db, actor: Actor, patientId: string, assessmentId: string, body: unknown): Promise<AssessmentsView> {
  const { user, access } = actor;
  return db.transaction(async (trx) => {
    await visiblePatient(trx, actor, patientId, writableSites(access), true);
    if (!(await findAssessment(trx, patientId, assessmentId))) throw new NotFoundError('The assessment');
    const input = await parseBody(assessmentRemovalSchema, body);
    const before = await currentOrStale(trx, patientId, assessmentId, input.version);
    if (!(await deleteAssessment(trx, assessmentId, input.version))) throw new ConflictError('Someone changed this assessment after you opened it.', { current: before });
    await writeAudit(trx, {
      actorUserId: user.id,
      trialId: access.trialId,
      entityType: 'assessment',
      entityId: assessmentId,
      action: 'removed',
      before,
      reason: input.reason,
    });
    await recomputeDerivation(trx, patientId, { actorUserId: user.id, fromAssessmentChange: true });
    return view(trx, access.trialId, patientId);
  });
}

export type NeedsAttentionItem = AttentionItem & { patientId: string; studyId: string };
export type NeedsAttentionSite = { siteId: string; siteCode: string; siteName: string; items: NeedsAttentionItem[] };

/**
 * Per site, what needs a look, read from the stored derivations (a trial of thousands of patients
 * never loads its assessments here). Overdue confirmations are judged against today.
 */
export async function needsAttention(db: Db, actor: Actor, today = new Date().toISOString().slice(0, 10)): Promise<{ sites: NeedsAttentionSite[]; today: string }> {
  const { access } = actor;
  const scope = siteScope(access);
  const sites = (await listTrialSites(db, access.trialId)).filter((s) => scope === 'all' || scope.includes(s.id));
  const bySite = new Map<string, NeedsAttentionSite>(sites.map((s) => [s.id, { siteId: s.id, siteCode: s.code, siteName: s.name, items: [] }]));
  for (const row of await listAttentionCandidates(db, access.trialId, scope)) {
    const stored = row.attention;
    const items: AttentionItem[] = stored.filter((a) => a.kind !== 'unconfirmed-past-window' && a.kind !== 'entered-disagrees');
    for (const open of row.pendingConfirmation) {
      if (open.upgrade || today <= open.dueBy) continue;
      items.push({
        kind: 'unconfirmed-past-window',
        message: `The ${open.response} on ${longDate(open.date)} is still unconfirmed: the next assessment was due by ${longDate(open.dueBy)}.`,
        date: open.date,
        assessmentId: open.assessmentId,
      });
    }
    if (row.outcomeFlag === DISAGREES_FLAG) {
      items.push(
        stored.find((a) => a.kind === 'entered-disagrees') ?? { kind: 'entered-disagrees', message: 'The entered outcome disagrees with the one derived from the assessments.' },
      );
    }
    if (items.length === 0) continue;
    const site = bySite.get(row.siteId) ?? { siteId: row.siteId, siteCode: row.siteCode, siteName: row.siteName, items: [] };
    bySite.set(row.siteId, site);
    site.items.push(...items.map((item) => ({ ...item, patientId: row.patientId, studyId: row.studyId })));
  }
  return { sites: [...bySite.values()], today };
}
