/**
 * The Designs page's rules: compare candidate designs, lock one with an electronic signature,
 * revise it before the first enrolment or amend it after (always with a reason and a new
 * signature), and open or stop accrual for a cohort.
 *
 * The design's numbers are always recomputed here from p0, p1, α, β, nmax and the selection; the
 * client names a choice, never the numbers that get signed.
 */
import { randomUUID } from 'node:crypto';
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import { ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import { hasRole, isUuid, type Actor } from '../auth/access.js';
import { recordSignature, type SigningSession } from '../signatures/signatures.js';
import { toxicityBoundary, toxicityBoundaryCharacteristics, type OperatingPoint, type ToxicityOperatingPoint } from '../stats/index.js';
import { emit, type Hooks } from '../hooks.js';
import { findCohort as findTrialCohort, listCohorts as listTrialCohorts, transitionCohort, trialCode, type Cohort, type CohortStatus, type StopCategory } from '../trials/index.js';
import { countEnrolledByCohort, restageCohort } from '../patients/index.js';
import { signatureMeaning, type CohortTransitionInput, type DesignLockInput, type SignatureKind } from './designs.schema.js';
import { curveFor, responseGrid, type DesignNumbers } from './candidates.js';
import { runBryantDayChoice, runChosenDesign } from './candidates-pool.js';
import { currentDesign, currentDesigns, insertDesignVersion, listDesignVersions, type DesignSafety, type DesignVersion, type LockedDesign } from './designs.repository.js';
import { toxicityGrid } from './safety-candidates.js';

/** A cohort as the Designs page shows it: the trial's cohort record and the trial it belongs to. */
export type DesignCohort = Cohort & { trialId: string };

/** The cohort of this trial (undefined for an id that is not one); with `lock`, its row stays locked until the transaction ends. */
async function findCohort(db: Db, trialId: string, cohortId: string, options: { lock?: boolean } = {}): Promise<DesignCohort | undefined> {
  if (!isUuid(cohortId)) return undefined;
  const cohort = await findTrialCohort(db, trialId, cohortId, options);
  return cohort && { ...cohort, trialId };
}

async function listCohorts(db: Db, trialId: string): Promise<DesignCohort[]> {
  return (await listTrialCohorts(db, trialId)).map((cohort) => ({ ...cohort, trialId }));
}

export type CohortDesigns = DesignCohort & {
  enrolled: number;
  versions: DesignVersion[];
  /** Operating characteristics of the design in force, for the charts. */
  currentCurve: OperatingPoint[] | null;
  /** The operating characteristics of its continuous toxicity boundary, when it has one. */
  currentBoundaryCurve: ToxicityOperatingPoint[] | null;
};

export async function listTrialDesigns(db: Db, actor: Actor): Promise<CohortDesigns[]> {
  const cohorts = await listCohorts(db, actor.access.trialId);
  const ids = cohorts.map((c) => c.id);
  const [versions, enrolled] = await Promise.all([listDesignVersions(db, ids), countEnrolledByCohort(db, ids)]);
  return cohorts.map((cohort) => {
    const mine = versions.filter((v) => v.cohortId === cohort.id);
    const current = mine[0];
    return {
      ...cohort,
      enrolled: enrolled.get(cohort.id) ?? 0,
      versions: mine,
      currentCurve: current ? curveFor({ ...current, en0: current.en0 ?? current.n, pet0: current.pet0 ?? 0 }, responseGrid(current.p0, current.p1)) : null,
      currentBoundaryCurve: current?.boundary ? toxicityBoundaryCharacteristics(current.boundary.bounds, toxicityGrid(current.boundary.theta)) : null,
    };
  });
}

const summary = (d: LockedDesign | undefined) =>
  d && {
    version: d.version,
    selection: d.selection,
    p0: d.p0,
    p1: d.p1,
    alpha: d.alpha,
    beta: d.beta,
    r1: d.r1,
    n1: d.n1,
    r: d.r,
    n: d.n,
    safetyRule: d.safetyRule,
    toxicity: d.toxicity,
    ...(d.boundary ? { boundary: { theta: d.boundary.theta, alpha: d.boundary.alpha } } : {}),
    ...(d.bryantDay ? { bryantDay: { t1: d.bryantDay.t1, t: d.bryantDay.t, toxAcceptable: d.bryantDay.toxAcceptable, toxUnacceptable: d.bryantDay.toxUnacceptable, alphaT: d.bryantDay.alphaT } } : {}),
  };

/**
 * The numbers a signature covers, recomputed here: the response design (or the Bryant–Day design,
 * whose response part is r1/n1, r/n with α as αR) and the safety rule with its toxicity definition.
 */
async function computeSignedNumbers(body: DesignLockInput): Promise<{ numbers: DesignNumbers; safety: DesignSafety }> {
  const settings = { p0: body.p0, p1: body.p1, alpha: body.alpha, beta: body.beta, nmax: body.nmax };
  const rule = body.safetyRule ?? 'none';
  const toxicity = rule === 'none' ? null : { minGrade: body.toxMinGrade as number, windowDays: body.toxWindowDays as number };
  if (rule === 'bryant_day') {
    const toxAcceptable = body.toxAcceptable as number;
    const toxUnacceptable = body.toxUnacceptable as number;
    const alphaT = body.alphaT as number;
    const chosen = await runBryantDayChoice(
      { pR0: body.p0, pR1: body.p1, toxAcceptable, toxUnacceptable, alphaR: body.alpha, alphaT, beta: body.beta, nmax: body.nmax },
      body.selection as 'optimal' | 'minimax',
    );
    return {
      numbers: { r1: chosen.r1, n1: chosen.n1, r: chosen.r, n: chosen.n, en0: chosen.expectedN.poorResponse, pet0: chosen.pet0, typeIError: chosen.alphaR, power: chosen.power },
      safety: {
        safetyRule: rule,
        toxicity,
        boundary: null,
        bryantDay: { toxAcceptable, toxUnacceptable, alphaT, t1: chosen.t1, t: chosen.t, attainedAlphaT: chosen.alphaT, expectedNHighToxicity: chosen.expectedN.highToxicity },
      },
    };
  }
  const numbers = await runChosenDesign(settings, body.selection, body.admissibleIndex ?? null);
  if (rule === 'none') return { numbers, safety: { safetyRule: rule, toxicity: null, boundary: null, bryantDay: null } };
  const theta = body.toxTheta as number;
  const alpha = body.toxAlpha as number;
  // The boundary watches the design's n patients.
  return { numbers, safety: { safetyRule: rule, toxicity, boundary: { theta, alpha, ...toxicityBoundary({ n: numbers.n, theta, alpha }) }, bryantDay: null } };
}

export type SignDesignInput = {
  cohortId: string;
  /** 'lock': version 1, or a new version before the first enrolment; 'amendment': after it. */
  route: 'lock' | 'amendment';
  body: DesignLockInput;
  /** The session signing: its password entry for this cohort's design (or amendment) is consumed; without one, nothing is written. */
  session: SigningSession;
};

/** Signs a new design version for a cohort: version 1, a revision before enrolment, or an amendment. */
export async function signDesign(db: Db, hooks: Hooks, actor: Actor, input: SignDesignInput): Promise<DesignVersion> {
  const { body } = input;
  const trialId = actor.access.trialId;
  const signer = { id: actor.user.id, email: actor.user.email };
  const settings = { p0: body.p0, p1: body.p1, alpha: body.alpha, beta: body.beta, nmax: body.nmax };
  const { numbers, safety } = await computeSignedNumbers(body);
  const reason = body.reason?.trim() || null;
  return db.transaction(async (trx) => {
    const cohort = await findCohort(trx, trialId, input.cohortId, { lock: true });
    if (!cohort) throw new NotFoundError('The cohort');
    if (cohort.status === 'stopped' || cohort.status === 'completed') {
      throw new ConflictError(`Cohort ${cohort.code} is ${cohort.status === 'stopped' ? 'stopped' : 'completed'}: its design can no longer change.`);
    }
    const current = await currentDesign(trx, cohort.id);
    if (body.basedOnVersion !== undefined && body.basedOnVersion !== (current?.version ?? 0)) {
      throw new ConflictError(
        current
          ? `The design of cohort ${cohort.code} is now at version ${current.version}, signed after you opened it. Review it before signing.`
          : `Cohort ${cohort.code} has no locked design any more than when you opened it; reload and review.`,
        { current: current ?? null },
      );
    }
    const enrolled = (await countEnrolledByCohort(trx, [cohort.id])).get(cohort.id) ?? 0;
    let kind: SignatureKind;
    if (input.route === 'lock') {
      if (enrolled > 0) {
        throw new ConflictError(
          `${enrolled} patient${enrolled === 1 ? ' is' : 's are'} enrolled in cohort ${cohort.code}: the design is locked, and a change now is an amendment with a reason.`,
        );
      }
      if (current && !reason) {
        const message = 'A new version of a locked design needs a reason.';
        throw new InputError(message, { reason: message });
      }
      kind = current ? 'revision' : 'lock';
    } else {
      if (!current) throw new ConflictError(`Cohort ${cohort.code} has no locked design yet: lock one first.`);
      if (enrolled === 0) {
        throw new ConflictError(
          `No patient is enrolled in cohort ${cohort.code} yet: sign a new version from the lock form instead (it also needs a reason).`,
        );
      }
      kind = 'amendment';
    }
    const code = (await trialCode(trx, trialId)) ?? '';
    const version = (current?.version ?? 0) + 1;
    const designId = randomUUID();
    const protocolReference = body.protocolReference.trim();
    const meaning = signatureMeaning({ kind, version, protocolReference, trialCode: code, cohortCode: cohort.code });
    const design = {
      id: designId,
      cohortId: cohort.id,
      version,
      selection: body.selection,
      ...settings,
      ...numbers,
      ...safety,
      analysisPopulation: body.analysisPopulation,
      interimAccrual: body.interimAccrual,
      sponsorSeesResponse: body.sponsorSeesResponse,
      protocolReference,
      amendmentReason: version === 1 ? null : reason,
      createdBy: signer.id,
    };
    const action = kind === 'amendment' ? 'amendment' : 'design';
    const signature = await recordSignature(trx, {
      trialId,
      signer,
      session: input.session,
      intent: { action, subjectId: cohort.id },
      meaning,
      subjectType: action,
      subjectId: designId,
      content: { trialId, trialCode: code, cohortCode: cohort.code, meaning, ...design },
    });
    const saved = await insertDesignVersion(trx, { ...design, signatureId: signature.id });
    if (current && (current.n1 !== saved.n1 || current.analysisPopulation !== saved.analysisPopulation)) {
      await restageCohort(trx, cohort.id, saved.n1, saved.analysisPopulation);
    }
    await writeAudit(trx, {
      actorUserId: signer.id,
      trialId,
      entityType: 'design',
      entityId: designId,
      action: kind === 'lock' ? 'design_locked' : kind === 'revision' ? 'design_revised' : 'design_amended',
      before: summary(current) ?? null,
      after: { ...summary(saved), cohortId: cohort.id, signatureId: signature.id, meaning },
      reason: saved.amendmentReason,
    });
    await emit(trx, hooks.designSigned, { trialId, cohortId: cohort.id, version, actorUserId: signer.id });
    const [withSignature] = (await listDesignVersions(trx, [cohort.id])).filter((v) => v.id === designId);
    return withSignature;
  });
}

/** Moves made by the patients and data-cut features, and where a person finds them. */
const ELSEWHERE: Partial<Record<CohortStatus, string>> = {
  draft: 'A cohort never returns to draft.',
  interim_review: 'A cohort moves to interim review when stage 1 is full; that happens on the Patients page, not here.',
  enrolling_stage_2: 'Continuing to stage 2 follows the committee review of a data cut; it is recorded on the Data cut pages, not here.',
  final_analysis: 'The final analysis starts from a data cut once accrual is complete; it is recorded on the Data cut pages, not here.',
  completed: 'A cohort is completed from its final analysis on the Data cut pages, not here.',
};

/** Stopping for futility or efficacy rests on the statistician's analysis; the trial manager records the rest. */
const ADMIN_STOP_CATEGORIES: StopCategory[] = ['safety', 'sponsor', 'other'];

export async function moveCohort(db: Db, { user, access }: Actor, cohortId: string, body: CohortTransitionInput): Promise<DesignCohort> {
  const to = body.to;
  const elsewhere = ELSEWHERE[to];
  if (elsewhere) throw new ConflictError(elsewhere);
  const category = body.stopCategory ?? null;
  if (to === 'enrolling_stage_1' && !hasRole(access, 'statistician')) {
    throw new ForbiddenError('Only the trial statistician opens accrual.');
  }
  if (to === 'stopped' && !hasRole(access, 'statistician') && !(category && ADMIN_STOP_CATEGORIES.includes(category))) {
    throw new ForbiddenError('Stopping for futility or efficacy follows the statistician’s analysis: the statistician records it.');
  }
  return db.transaction(async (trx): Promise<DesignCohort> => {
    const cohort = await findCohort(trx, access.trialId, cohortId, { lock: true });
    if (!cohort) throw new NotFoundError('The cohort');
    if (to === 'enrolling_stage_1' && cohort.status === 'draft' && !(await currentDesigns(trx, [cohort.id])).has(cohort.id)) {
      throw new ConflictError(`Cohort ${cohort.code} has no locked design: lock and sign a design before opening accrual.`);
    }
    await transitionCohort(trx, {
      cohortId: cohort.id,
      to,
      actorUserId: user.id,
      reason: body.reason?.trim() || null,
      stopCategory: to === 'stopped' ? category : null,
      from: body.from,
    });
    return (await findCohort(trx, access.trialId, cohort.id)) as DesignCohort;
  });
}
