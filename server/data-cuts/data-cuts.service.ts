/**
 * Data cuts as the business rules see them: freezing a cut (a consistent copy of every patient in
 * scope, hashed), analysing it from the copy only, the committee's signed recommendations, and the
 * decision the statistician applies to the cohort afterwards, with the people who must hear of it.
 * A cut's analysis settings (the prior) are numbered analysis versions: a recommendation signs
 * one, and a later change starts the next. Its report is issued once per report version and then
 * served as stored.
 */
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { deepFreeze, VersionedCache } from '../db/trial-versions.js';
import { hasRole, type Actor, type Role, type SessionUser } from '../auth/access.js';
import { recipientRoles } from '../auth/visibility.js';
import { writeAudit } from '../audit/audit.js';
import { enqueueMail } from '../mail/outbox.js';
import { contentHash, recordSignature, type SigningSession } from '../signatures/signatures.js';
import { currentDesigns } from '../designs/index.js';
import { findCohort, listCohorts, lockTrialHeading, resumeAfterSafetyReview, safetyReviewOf, transitionCohort, type Cohort, type CohortStatus } from '../trials/index.js';
import { currentSafetyState, listEventsOfCohorts, ruleToxicities } from '../safety/index.js';
import { ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import { analyseCut, type Analysis, type PriorSetting } from './analysis.js';
import { adrsCsv, adverseEventsCsv, patientsCsv } from './exports.js';
import { renderCutReport } from './report/pdf.js';
import { listPatientsWithAssessments } from '../patients/index.js';
import { insertReleasedFigures } from '../evaluation/index.js';
import { countMonitors, decisionRecipients, findUserName, statisticianEmails } from '../people/index.js';
import { findDataCut, insertAnalysisVersion, insertDataCut, listDataCuts, nextSeq, releaseToSponsor, trialOfCut, type CutSnapshot, type DataCut } from './data-cuts.repository.js';
import { findReport, insertReport, type ReportCoverage } from './reports.repository.js';
import { byCohortThenSeq, insertCutPatients, readCutPatients, type CutPatient } from './cut-patients.repository.js';
import { byPatientThenOnset, insertCutAdverseEvents, readCutAdverseEvents, type CutAdverseEvent } from './cut-adverse-events.repository.js';
import { findRecommendationBy, insertRecommendation, listRecommendations } from './recommendations.repository.js';
import { insertDecision, listDecisions } from './decisions.repository.js';
import { decisionChoices, recommendationChoices, type CreateDataCutInput, type DecisionAction, type DecisionInput, type PriorInput, type RecommendationInput, type StatusDecision, type CutDataset } from './data-cuts.schema.js';
import { DECISION_POINT_CAUTIONS, DECISION_WORDS, RECOMMENDATION_WORDS, recommendationMeaning, stoppedFor } from '../words/index.js';

/** Who freezes, signs or decides: the signed-in user (the route has checked their role on the cut's trial). */
type Author = Pick<SessionUser, 'id' | 'email'>;

export { trialOfCut };

/**
 * The canonical content a cut's hash covers: scope, time, the frozen trial and designs, every
 * patient, and every adverse event where the cut froze them (older cuts keep the hash they had).
 */
export function cutContent(cut: Pick<DataCut, 'trialId' | 'cohortId' | 'kind' | 'cutAt' | 'snapshot'>, patients: CutPatient[], adverseEvents: CutAdverseEvent[]) {
  const content = { trialId: cut.trialId, cohortId: cut.cohortId, kind: cut.kind, cutAt: cut.cutAt, snapshot: cut.snapshot, patients };
  return cut.snapshot.adverseEventsFrozen ? { ...content, adverseEvents } : content;
}

/** A live adverse event in the shape the cut keeps (the hash covers exactly these fields). */
function asCutAdverseEvent(e: Awaited<ReturnType<typeof listEventsOfCohorts>>[number]): CutAdverseEvent {
  return {
    eventId: e.id,
    patientId: e.patientId,
    studyId: e.studyId,
    siteCode: e.siteCode,
    cohortId: e.cohortId,
    onsetOn: e.onsetOn,
    term: e.term,
    grade: e.grade,
    attribution: e.attribution,
    serious: e.serious,
    outcome: e.outcome,
    attested: e.attested !== null,
    attestationSignatureId: e.attested?.signatureId ?? null,
    eventVersion: e.version,
  };
}

/** A live patient in the shape the cut keeps (the hash covers exactly these fields). */
function asCutPatient(p: Awaited<ReturnType<typeof listPatientsWithAssessments>>[number]): CutPatient {
  return {
    patientId: p.id,
    studyId: p.studyId,
    siteId: p.siteId,
    siteCode: p.siteCode,
    cohortId: p.cohortId,
    cohortCode: p.cohortCode,
    stage: p.stage,
    enrolmentSeq: p.enrolmentSeq,
    enrolledOn: p.enrolledOn,
    outcome: p.outcome,
    bestOverallResponse: p.bestOverallResponse,
    responseAssessedOn: p.responseAssessedOn,
    evaluable: p.evaluable,
    notEvaluableReason: p.notEvaluableReason,
    attested: p.attested !== null,
    attestationSignatureId: p.attested?.signatureId ?? null,
    derivedBestOverallResponse: p.derivedBestOverallResponse,
    derivedResponder: p.derivedResponder,
    outcomeFlag: p.outcomeFlag,
    patientVersion: p.version,
    assessments: p.assessments,
  };
}

const cohortLabel = (cut: DataCut) => cut.snapshot.cohorts.map((c) => c.code).join(', ');

/**
 * A cut of the past, for building the demo history only: its time, the patients enrolled by then,
 * and the cohort status the cut saw.
 */
export type HistoricalCut = { cutAt: Date; enrolledOnOrBefore: string; cohortStatusAtCut: CohortStatus };

export async function freezeDataCut(db: Db, input: CreateDataCutInput & { trialId: string }, actor: Author): Promise<DataCut> {
  // Repeatable read: every patient and assessment is copied as of one instant.
  return db.transaction((trx) => freezeWithin(trx, input, actor), { isolationLevel: 'repeatable read' });
}

export async function freezeWithin(
  trx: Knex.Transaction,
  input: CreateDataCutInput & { trialId: string },
  actor: Author,
  history?: HistoricalCut,
): Promise<DataCut> {
  const trial = await lockTrialHeading(trx, input.trialId);
  if (!trial) throw new NotFoundError('The trial');
  const cohorts = await listCohorts(trx, input.trialId);
  const scope = input.cohortId ? cohorts.filter((c) => c.id === input.cohortId) : cohorts;
  if (input.cohortId && scope.length === 0) throw new InputError('That cohort is not part of this trial.', { cohortId: 'Choose a cohort of this trial.' });
  const designs = await currentDesigns(trx, scope.map((c) => c.id));
  if (designs.size === 0) {
    throw new InputError('No cohort in this cut has a locked design yet: lock a design first.', { cohortId: 'This cohort has no locked design.' });
  }
  const snapshot: CutSnapshot = {
    trial: { id: trial.id, code: trial.code, title: trial.title, indication: trial.indication, sponsorName: trial.sponsorName },
    cohorts: scope.map((c) => {
      const d = designs.get(c.id);
      return {
        id: c.id,
        code: c.code,
        name: c.name,
        status: history?.cohortStatusAtCut ?? c.status,
        design: d
          ? {
              id: d.id,
              version: d.version,
              selection: d.selection,
              p0: d.p0,
              p1: d.p1,
              alpha: d.alpha,
              beta: d.beta,
              nmax: d.nmax,
              r1: d.r1,
              n1: d.n1,
              r: d.r,
              n: d.n,
              en0: d.en0,
              pet0: d.pet0,
              typeIError: d.typeIError,
              power: d.power,
              analysisPopulation: d.analysisPopulation,
              interimAccrual: d.interimAccrual,
              sponsorSeesResponse: d.sponsorSeesResponse,
              protocolReference: d.protocolReference,
              safetyRule: d.safetyRule,
              toxicity: d.toxicity,
              boundary: d.boundary,
              bryantDay: d.bryantDay,
            }
          : null,
      };
    }),
    adverseEventsFrozen: true,
  };
  const live = (await listPatientsWithAssessments(trx, scope.map((c) => c.id))).map(asCutPatient).sort(byCohortThenSeq);
  const patients = history ? live.filter((p) => p.enrolledOn <= history.enrolledOnOrBefore) : live;
  const frozenPatients = new Set(patients.map((p) => p.patientId));
  const adverseEvents = (await listEventsOfCohorts(trx, scope.map((c) => c.id)))
    .filter((e) => frozenPatients.has(e.patientId) && (!history || e.onsetOn <= history.enrolledOnOrBefore))
    .map(asCutAdverseEvent)
    .sort(byPatientThenOnset);
  const base = {
    trialId: input.trialId,
    cohortId: input.cohortId ?? null,
    kind: input.kind,
    cutAt: (history?.cutAt ?? new Date()).toISOString(),
    snapshot,
  };
  const counts = {
    patients: patients.length,
    pending: patients.filter((p) => p.outcome === 'pending').length,
    unattested: patients.filter((p) => p.outcome !== 'pending' && !p.attested).length,
    flagged: patients.filter((p) => p.outcomeFlag).length,
    notEvaluable: patients.filter((p) => !p.evaluable).length,
  };
  const cut = await insertDataCut(trx, {
    ...base,
    seq: await nextSeq(trx, input.trialId),
    designVersionId: scope.length === 1 ? (designs.get(scope[0].id)?.id ?? null) : null,
    createdBy: actor.id,
    contentHash: contentHash(cutContent(base, patients, adverseEvents)),
    counts,
  });
  await insertCutPatients(trx, cut.id, patients);
  await insertCutAdverseEvents(trx, cut.id, adverseEvents);
  await writeAudit(trx, {
    actorUserId: actor.id,
    trialId: input.trialId,
    entityType: 'data_cut',
    entityId: cut.id,
    action: 'frozen',
    after: { seq: cut.seq, kind: cut.kind, cohortId: cut.cohortId, cutAt: cut.cutAt, contentHash: cut.contentHash, counts },
  });
  return cut;
}

export async function listCuts(db: Db, actor: Actor) {
  const { trialId } = actor.access;
  const [cuts, monitors] = await Promise.all([listDataCuts(db, trialId), countMonitors(db, trialId)]);
  return { dataCuts: cuts.map(({ snapshot, ...cut }) => ({ ...cut, cohorts: snapshot.cohorts.map((c) => ({ id: c.id, code: c.code, name: c.name })) })), committeeSize: monitors };
}

async function requireCut(db: Db | Knex.Transaction, cutId: string, forUpdate = false): Promise<DataCut> {
  const cut = await findDataCut(db, cutId, { forUpdate });
  if (!cut) throw new NotFoundError('The data cut');
  return cut;
}

export async function cutDetail(db: Db, cutId: string) {
  const cut = await requireCut(db, cutId);
  const [recommendations, decisions, committeeSize] = await Promise.all([listRecommendations(db, cutId), listDecisions(db, cutId), countMonitors(db, cut.trialId)]);
  return { dataCut: cut, recommendations, decisions, committeeSize };
}

export type CutAnalysis = Analysis & { integrity: { contentHash: string; recomputedHash: string; intact: boolean } };

/** The answer to every request for this analysis: frozen, with the integrity check beside it. */
type Verified = { answer: CutAnalysis };

// Analyses of cuts whose frozen content was re-read and re-hashed, by cut, analysis version and prior.
const verified = new VersionedCache<Verified>(200);

/**
 * The analysis of a cut from its frozen copy; a prior given here overrides the saved one for this
 * answer only. The frozen rows are re-read and re-hashed against the cut's content hash the first
 * time a server process analyses the cut (for each analysis version and prior), and always with
 * `reverify` (releasing figures, rendering the signed report); in between, the database keeps the
 * rows as they were verified (written only with their cut, then never changed: see the migrations).
 */
export async function analyseDataCut(
  db: Db | Knex.Transaction,
  cutId: string,
  override?: Partial<PriorSetting>,
  options: { reverify?: boolean } = {},
): Promise<CutAnalysis> {
  const cut = await requireCut(db, cutId);
  const overridden = override && (override.a !== undefined || override.thetaT !== undefined);
  const prior: PriorSetting = overridden
    ? { a: override.a ?? cut.prior.a, b: override.b ?? cut.prior.b, thetaT: override.thetaT ?? cut.prior.thetaT }
    : cut.prior;
  const priorSource = overridden ? 'request' : 'saved';
  const key = JSON.stringify([cut.id, cut.analysisVersionId, prior, priorSource]);
  let found = options.reverify ? undefined : verified.get(key, 0);
  if (!found) {
    const [patients, adverseEvents] = await Promise.all([readCutPatients(db, cutId), readCutAdverseEvents(db, cutId)]);
    const analysis = analyseCut({
      cut: { id: cut.id, seq: cut.seq, kind: cut.kind, cutAt: cut.cutAt, contentHash: cut.contentHash, cohortId: cut.cohortId },
      snapshot: cut.snapshot,
      patients,
      adverseEvents,
      prior,
      priorSource,
    });
    const recomputedHash = contentHash(cutContent(cut, patients, adverseEvents));
    found = { answer: deepFreeze({ ...analysis, integrity: { contentHash: cut.contentHash, recomputedHash, intact: recomputedHash === cut.contentHash } }) };
    verified.set(key, 0, found);
  }
  return found.answer;
}

/**
 * A new prior starts the cut's next analysis version (append-only): a recommendation already
 * signed keeps pointing at the version it signed, and the version it signed stays as it was.
 */
export async function savePrior(db: Db, cutId: string, input: PriorInput, actor: Author): Promise<DataCut> {
  return db.transaction(async (trx) => {
    const before = await requireCut(trx, cutId, true);
    if (before.version !== input.version) throw new ConflictError('Someone changed this setting meanwhile; here is the current one.', { current: before });
    const prior = { a: input.a ?? null, b: input.b ?? null, thetaT: input.thetaT };
    await insertAnalysisVersion(trx, { dataCutId: cutId, version: before.version + 1, prior, createdBy: actor.id });
    const updated = (await findDataCut(trx, cutId)) as DataCut;
    await writeAudit(trx, {
      actorUserId: actor.id,
      trialId: before.trialId,
      entityType: 'data_cut',
      entityId: cutId,
      action: 'prior_changed',
      before: { analysisVersion: before.version, ...before.prior },
      after: { analysisVersion: updated.version, analysisVersionId: updated.analysisVersionId, ...updated.prior },
    });
    return updated;
  });
}

/** A committee member signs a recommendation on the cut's current analysis version; the password must have been entered for this cut. */
export async function recommend(db: Db, cutId: string, input: RecommendationInput, signer: Author, session: SigningSession): Promise<{ id: string; signatureId: string }> {
  const cut = await requireCut(db, cutId);
  if (!recommendationChoices(cut.snapshot.cohorts).includes(input.decision)) {
    throw new InputError('No cohort of this data cut has a stage 2 still ahead.', { decision: 'Continue to stage 2 applies only where a stage 2 exists and has not begun.' });
  }
  if (await findRecommendationBy(db, cutId, signer.id)) {
    throw new ConflictError('You have already signed a recommendation on this data cut.');
  }
  try {
    // The cut's row lock keeps the analysis version still while the member signs it.
    return await db.transaction(async (trx) => signWithin(trx, await requireCut(trx, cutId, true), input, signer, session));
  } catch (error) {
    // Two tabs signing at once: the unique key decides, the second is told plainly.
    if ((error as { code?: string }).code === '23505') throw new ConflictError('You have already signed a recommendation on this data cut.');
    throw error;
  }
}

/** Records a member's signed recommendation on a cut and tells the statisticians, inside the caller's transaction. */
export async function signWithin(
  trx: Knex.Transaction,
  cut: DataCut,
  input: RecommendationInput,
  signer: Author,
  session: SigningSession,
  options: { notify?: boolean } = {},
): Promise<{ id: string; signatureId: string }> {
  const label = RECOMMENDATION_WORDS[input.decision].label;
  if (input.analysisVersion !== cut.version) {
    throw new ConflictError(`The analysis of data cut ${cut.seq} is now at version ${cut.version} (its prior changed since you opened it). Review it before signing.`, {
      current: { analysisVersion: cut.version, prior: cut.prior },
    });
  }
  const analysisVersion = { id: cut.analysisVersionId, version: cut.version, prior: cut.prior };
  const signature = await recordSignature(trx, {
    trialId: cut.trialId,
    signer,
    session,
    intent: { action: 'recommendation', subjectId: cut.id },
    meaning: recommendationMeaning({
      decision: input.decision,
      trialCode: cut.snapshot.trial.code,
      cohortCodes: cut.snapshot.cohorts.map((c) => c.code),
      cutSeq: cut.seq,
      cutId: cut.id,
      analysisVersion: cut.version,
    }),
    subjectType: 'recommendation',
    subjectId: cut.id,
    // The prior is part of what the member saw: the signature covers the analysis version, not only the frozen data.
    content: { dataCutId: cut.id, contentHash: cut.contentHash, analysisVersion, decision: input.decision, rationale: input.rationale },
  });
  const id = await insertRecommendation(trx, {
    dataCutId: cut.id,
    memberUserId: signer.id,
    decision: input.decision,
    rationale: input.rationale,
    signatureId: signature.id,
    analysisVersionId: cut.analysisVersionId,
  });
  await writeAudit(trx, {
    actorUserId: signer.id,
    trialId: cut.trialId,
    entityType: 'recommendation',
    entityId: id,
    action: 'signed',
    after: { dataCutId: cut.id, analysisVersion: cut.version, decision: input.decision, rationale: input.rationale, signatureId: signature.id },
  });
  if (options.notify !== false) {
    // A recommendation on a cut not yet released is live efficacy: it goes to the statisticians only.
    const statisticians = await statisticianEmails(trx, cut.trialId);
    await enqueueMail(
      trx,
      statisticians.map((email) => ({
        kind: 'recommendation_signed',
        to: email,
        subject: `${cut.snapshot.trial.code}: a committee recommendation was signed on data cut ${cut.seq}`,
        text: `A committee member signed the recommendation "${label}" on data cut ${cut.seq} of ${cut.snapshot.trial.code} (cohort ${cohortLabel(cut)}).\n\nOpen the committee review in Orrery to read the rationale and, when the committee is done, apply the decision.\n\n${DECISION_POINT_CAUTIONS.recommendationSigned}`,
        dedupeKey: `recommendation:${id}:${email}`,
      })),
    );
  }
  return { id, signatureId: signature.id };
}

export async function recommendations(db: Db, cutId: string) {
  const cut = await requireCut(db, cutId);
  const [list, committeeSize] = await Promise.all([listRecommendations(db, cutId), countMonitors(db, cut.trialId)]);
  return { recommendations: list, committeeSize, signed: list.length };
}

export const DECISION_TARGET: Record<StatusDecision, CohortStatus> = {
  resume_stage_2: 'enrolling_stage_2',
  stop: 'stopped',
  final_analysis: 'final_analysis',
  complete: 'completed',
};

function decisionMail(trialCode: string, cohortCode: string, action: DecisionAction, reason: string, cut: DataCut, stopCategory: string | null) {
  const what = {
    resume_stage_2: `accrual resumes for stage 2 in cohort ${cohortCode}. Sites may enrol again.`,
    stop: `cohort ${cohortCode} is stopped ${stoppedFor(stopCategory)}. Do not enrol further patients; follow the protocol for patients on treatment.`,
    final_analysis: `cohort ${cohortCode} moves to the final analysis. Enrolment is closed.`,
    complete: `cohort ${cohortCode} is completed.`,
    resume_accrual: `accrual resumes in cohort ${cohortCode} after the committee's safety review. Sites may enrol again.`,
  }[action];
  return {
    subject: `${trialCode} ${cohortCode}: ${DECISION_WORDS[action].label.toLowerCase()}`,
    text: `After the review of data cut ${cut.seq} by the data monitoring committee, ${what}\n\nReason: ${reason}\n\nThis message was sent by Orrery; the decision itself rests with the trial statistician, the data monitoring committee and the ethics board.`,
  };
}

/**
 * Accrual resumes after a safety pause only on a cut frozen since the pause began (so the committee
 * saw the data that paused it), with a member's signed recommendation to resume, and only when no
 * toxicity has been added since the pause (the committee has not reviewed it).
 */
async function requireSafetyReview(trx: Knex.Transaction, cut: DataCut, cohort: Cohort, recommended: string[]): Promise<void> {
  if (!cohort.safetyPause) throw new ConflictError(`Cohort ${cohort.code} is not paused for safety: there is no accrual to resume after a safety review.`);
  if (Date.parse(cut.cutAt) < Date.parse(cohort.safetyPause.since)) {
    throw new ConflictError(`Data cut ${cut.seq} was frozen before accrual paused for safety: freeze a new cut so the committee reviews the data that paused it.`);
  }
  if (!recommended.includes('resume_accrual')) {
    throw new ConflictError('Accrual resumes after a safety pause only on a committee recommendation to resume it, and no member has signed one on this data cut.');
  }
  const state = await currentSafetyState(trx, cohort.id);
  const { pauseToxicities } = await safetyReviewOf(trx, cohort.id);
  if (state?.crossed && pauseToxicities !== null && ruleToxicities(state) > pauseToxicities) {
    throw new ConflictError('More toxicities have been recorded since accrual paused: freeze a new data cut so the committee reviews them before accrual resumes.');
  }
}

/** Applying the committee's decision is the trial statistician's alone. */
export async function applyDecision(db: Db, cutId: string, input: DecisionInput, actor: Actor) {
  if (!hasRole(actor.access, 'statistician')) throw new ForbiddenError('Applying the committee’s decision is the trial statistician’s alone.');
  return db.transaction((trx) => applyWithin(trx, cutId, input, actor.user));
}

/** Moves the cohort as decided, records the decision, releases the figures and queues the mail, inside the caller's transaction. */
export async function applyWithin(trx: Knex.Transaction, cutId: string, input: DecisionInput, actor: Author, options: { notify?: boolean } = {}) {
  const cut = await requireCut(trx, cutId, true);
  const cohortIds = cut.snapshot.cohorts.map((c) => c.id);
  const cohortId = cut.cohortId ?? (cohortIds.length === 1 ? cohortIds[0] : input.cohortId);
  if (!cohortId || !cohortIds.includes(cohortId)) {
    throw new InputError('This data cut covers several cohorts: choose the one the decision applies to.', { cohortId: 'Choose a cohort of this data cut.' });
  }
  const signed = await listRecommendations(trx, cutId);
  if (cut.kind === 'interim' && signed.length === 0) {
    throw new ConflictError('No committee member has signed a recommendation on this interim data cut yet.');
  }
  if ((await listDecisions(trx, cutId)).some((d) => d.cohortId === cohortId)) {
    throw new ConflictError('A decision on this cohort has already been applied from this data cut.');
  }
  const current = await findCohort(trx, cut.trialId, cohortId);
  if (!current) throw new NotFoundError('The cohort');
  const frozen = cut.snapshot.cohorts.find((c) => c.id === cohortId);
  if (frozen && !decisionChoices(frozen).includes(input.action)) {
    throw new InputError(`Cohort ${frozen.code} has no stage 2 still ahead.`, { action: 'Resume accrual for stage 2 applies only where a stage 2 exists and has not begun.' });
  }
  const reason = input.reason;
  const stopCategory = input.action === 'stop' ? (input.stopCategory ?? null) : null;
  let moved: { from: CohortStatus; to: CohortStatus };
  if (input.action === 'resume_accrual') {
    await requireSafetyReview(trx, cut, current, signed.map((r) => r.decision));
    await resumeAfterSafetyReview(trx, { cohortId, reason, actorUserId: actor.id });
    moved = { from: current.status, to: current.status };
  } else {
    // A design that let accrual continue at risk reaches the decision still in stage 1: the review is the interim review.
    if (input.action === 'resume_stage_2' && current.status === 'enrolling_stage_1') {
      await transitionCohort(trx, { cohortId, to: 'interim_review', actorUserId: actor.id, reason, from: 'enrolling_stage_1' });
    }
    moved = await transitionCohort(trx, { cohortId, to: DECISION_TARGET[input.action], actorUserId: actor.id, reason, stopCategory });
  }
  const decisionId = await insertDecision(trx, {
    dataCutId: cutId,
    cohortId,
    action: input.action,
    fromStatus: current.status,
    toStatus: moved.to,
    stopCategory,
    reason,
    appliedBy: actor.id,
  });
  await releaseCohort(trx, cut, cohortId, decisionId, actor);
  await writeAudit(trx, {
    actorUserId: actor.id,
    trialId: cut.trialId,
    entityType: 'data_cut',
    entityId: cutId,
    action: 'decision_applied',
    before: { cohortStatus: current.status },
    after: { decisionId, cohortId, action: input.action, cohortStatus: moved.to, stopCategory, recommendations: signed.map((r) => r.decision) },
    reason,
  });
  if (options.notify !== false) {
    // The decision is a verdict on the cut it releases: its readers are the release's audience.
    const audience = recipientRoles('released-efficacy', ['coordinator', 'investigator', 'sponsor']);
    const recipients = (await decisionRecipients(trx, cut.trialId)).filter((r) => audience.includes(r.role as Role));
    const mail = decisionMail(cut.snapshot.trial.code, current.code, input.action, reason, cut, stopCategory);
    await enqueueMail(
      trx,
      [...new Set(recipients.map((r) => r.email.toLowerCase()))].map((email) => ({
        kind: 'cohort_decision',
        to: email,
        subject: mail.subject,
        text: mail.text,
        dedupeKey: `decision:${decisionId}:${email}`,
      })),
    );
  }
  return { decision: (await listDecisions(trx, cutId)).find((d) => d.id === decisionId), appliedByName: await findUserName(trx, actor.id) };
}

/**
 * Releases what a committee decision on the cut makes visible beyond the committee: the cut is
 * marked released, and the cohort's figures from the cut's analysis are kept as they stand (one
 * computation: `analyseCut` on the frozen copy), with an audit row. Later outcomes never move them.
 */
export async function releaseCohort(trx: Knex.Transaction, cut: DataCut, cohortId: string, decisionId: string, actor: Author): Promise<void> {
  await releaseToSponsor(trx, cut.id);
  const analysis = await analyseDataCut(trx, cut.id, undefined, { reverify: true });
  if (!analysis.integrity.intact) throw new ConflictError('The data cut no longer matches its content hash: nothing can be released from it.');
  const cohort = analysis.cohorts.find((c) => c.cohortId === cohortId);
  // A cohort without a locked design at the cut has no figures to release.
  if (!cohort?.counts) return;
  const { counts, responseRate, exactTest, rule, inference, bayes } = cohort;
  const cohortSafety = analysis.safety.find((s) => s.cohortId === cohortId);
  const safety = cohortSafety?.eventsFrozen
    ? { safetyRule: cohortSafety.safetyRule, counts: cohortSafety.counts, toxicityRate: cohortSafety.toxicityRate, state: cohortSafety.state, joint: cohortSafety.joint, sentences: cohortSafety.sentences }
    : undefined;
  await insertReleasedFigures(trx, {
    cutId: cut.id,
    cohortId,
    decisionId,
    cutSeq: cut.seq,
    cutKind: cut.kind,
    cutAt: cut.cutAt,
    figures: { counts, responseRate, exactTest, rule, inference, bayes, safety },
  });
  await writeAudit(trx, {
    actorUserId: actor.id,
    trialId: cut.trialId,
    entityType: 'data_cut',
    entityId: cut.id,
    action: 'figures_released',
    after: { cohortId, decisionId, cutAt: cut.cutAt, responders: counts.responders, decided: counts.decided, pending: counts.pending },
  });
}

/**
 * The cut's PDF report for what it covers now (analysis version, recommendations, decisions). The
 * first request for a report version renders it and keeps its bytes and hash; every later request
 * gets those stored bytes, so the hash of a report version never changes.
 */
export async function cutReport(db: Db, cutId: string, requester: Author): Promise<{ pdf: Buffer; hash: string; version: number; filename: string }> {
  return db.transaction(async (trx) => {
    // The cut's row lock numbers report versions one at a time.
    const cut = await requireCut(trx, cutId, true);
    const [recommendationList, decisions, committeeSize] = await Promise.all([listRecommendations(trx, cutId), listDecisions(trx, cutId), countMonitors(trx, cut.trialId)]);
    const coverage: ReportCoverage = { dataCutId: cutId, analysisVersionId: cut.analysisVersionId, recommendationCount: recommendationList.length, decisionCount: decisions.length };
    let report = await findReport(trx, coverage);
    if (!report) {
      const analysis = await analyseDataCut(trx, cutId, undefined, { reverify: true });
      const pdf = await renderCutReport({ cut, analysis, recommendations: recommendationList, decisions, committeeSize });
      report = await insertReport(trx, { ...coverage, pdf, sha256: createHash('sha256').update(pdf).digest('hex'), createdBy: requester.id });
      await writeAudit(trx, {
        actorUserId: requester.id,
        trialId: cut.trialId,
        entityType: 'data_cut',
        entityId: cutId,
        action: 'report_issued',
        after: { reportVersion: report.seq, sha256: report.sha256, analysisVersion: cut.version, recommendations: coverage.recommendationCount, decisions: coverage.decisionCount },
      });
    }
    return { pdf: report.pdf, hash: report.sha256, version: report.seq, filename: `${cut.snapshot.trial.code}-data-cut-${cut.seq}-report-${report.seq}.pdf` };
  });
}

function csvName(code: string, seq: number, what: string) {
  return `${code}-data-cut-${seq}-${what}.csv`.replace(/[^A-Za-z0-9._-]/g, '_');
}

/** One of the cut's CSV datasets, from its frozen patients and adverse events. */
export async function cutExport(db: Db, cutId: string, dataset: CutDataset): Promise<{ csv: string; filename: string }> {
  const { dataCut } = await cutDetail(db, cutId);
  const patients = await readCutPatients(db, cutId);
  if (dataset === 'ae') {
    const analysis = await analyseDataCut(db, cutId);
    const toxic = new Set(analysis.safety.flatMap((c) => c.qualifyingEventIds));
    const csv = adverseEventsCsv(dataCut, patients, await readCutAdverseEvents(db, cutId), toxic);
    return { csv, filename: csvName(dataCut.snapshot.trial.code, dataCut.seq, dataset) };
  }
  const csv = dataset === 'adrs' ? adrsCsv(dataCut, patients) : patientsCsv(dataCut, patients);
  return { csv, filename: csvName(dataCut.snapshot.trial.code, dataCut.seq, dataset) };
}
