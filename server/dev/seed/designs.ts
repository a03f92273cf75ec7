/**
 * Demo designs: a signed design for every cohort of TSY-201 to TSY-204, locked by the demo
 * statistician, and each cohort walked through the status machine to where the demo scenario has it.
 * TSY-201 also monitors toxicity with a continuous boundary (invented settings). TSY-205 stays a
 * draft with no design. Idempotent: a cohort that has a design is left alone.
 */
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { writeAudit } from '../../audit/audit.js';
import { recordSignature } from '../../signatures/signatures.js';
import { demoSigningSession } from './signing.js';
import { transitionCohort, type CohortStatus, type StopCategory } from '../../trials/index.js';
import { chosenDesign, signatureMeaning, type Selection } from '../../designs/index.js';
import { toxicityBoundary } from '../../stats/index.js';

type DemoDesign = {
  trial: string;
  cohort: string;
  p0: number;
  p1: number;
  selection: Selection;
  analysisPopulation: 'all_enrolled' | 'evaluable';
  interimAccrual: 'pause' | 'continue_at_risk';
  sponsorSeesResponse: boolean;
  protocolReference: string;
  /** The statuses the cohort passes through after draft, in order. */
  path: CohortStatus[];
  stop?: { category: StopCategory; reason: string };
  /** A continuous toxicity boundary over the design's n, with the protocol's toxicity definition. */
  boundary?: { theta: number; alpha: number; minGrade: number; windowDays: number };
};

const STAGE_2: CohortStatus[] = ['enrolling_stage_1', 'interim_review', 'enrolling_stage_2'];

const DEMO_DESIGNS: DemoDesign[] = [
  {
    trial: 'TSY-201',
    cohort: 'MAIN',
    p0: 0.2,
    p1: 0.4,
    selection: 'optimal',
    analysisPopulation: 'all_enrolled',
    interimAccrual: 'pause',
    sponsorSeesResponse: false,
    protocolReference: 'TSY-201-PRT v2.0',
    path: STAGE_2,
    boundary: { theta: 0.25, alpha: 0.1, minGrade: 3, windowDays: 28 },
  },
  {
    trial: 'TSY-202',
    cohort: 'MAIN',
    p0: 0.1,
    p1: 0.3,
    selection: 'minimax',
    analysisPopulation: 'evaluable',
    interimAccrual: 'pause',
    sponsorSeesResponse: false,
    protocolReference: 'TSY-202-PRT v1.1',
    path: ['enrolling_stage_1', 'interim_review'],
  },
  {
    trial: 'TSY-203',
    cohort: 'MAIN',
    p0: 0.05,
    p1: 0.2,
    selection: 'optimal',
    analysisPopulation: 'all_enrolled',
    interimAccrual: 'pause',
    sponsorSeesResponse: true,
    protocolReference: 'TSY-203-PRT v1.0',
    path: ['enrolling_stage_1', 'interim_review', 'stopped'],
    stop: {
      category: 'futility',
      reason: 'Stage-1 futility rule met: no responder among the first 10 patients (the rule stops at 0 or fewer).',
    },
  },
  ...[
    { cohort: 'NSCLC', p0: 0.1, p1: 0.25, selection: 'optimal' as const },
    { cohort: 'CRC', p0: 0.05, p1: 0.2, selection: 'minimax' as const },
    { cohort: 'THY', p0: 0.15, p1: 0.35, selection: 'optimal' as const },
  ].map((c) => ({
    trial: 'TSY-204',
    ...c,
    analysisPopulation: 'evaluable' as const,
    interimAccrual: 'pause' as const,
    sponsorSeesResponse: false,
    protocolReference: 'TSY-204-PRT v3.0',
    path: ['enrolling_stage_1' as const],
  })),
];

const SETTINGS = { alpha: 0.05, beta: 0.2, nmax: 80 };
const STATISTICIAN = 'sam.stat@tessaly.test';

export async function seedDesigns(trx: Knex.Transaction, trials: Map<string, string>, today: Date): Promise<void> {
  const signer = await trx('users').whereRaw('lower(email) = ?', [STATISTICIAN]).first('id', 'email');
  if (!signer) return;
  for (const demo of DEMO_DESIGNS) {
    const trialId = trials.get(demo.trial);
    if (!trialId) continue;
    const cohort = await trx('cohorts').where({ trial_id: trialId, code: demo.cohort }).first('id', 'status');
    if (!cohort) continue;
    if (await trx('design_versions').where({ cohort_id: cohort.id }).first('id')) continue;

    const settings = { p0: demo.p0, p1: demo.p1, ...SETTINGS };
    const numbers = chosenDesign(settings, demo.selection);
    const meaning = signatureMeaning({
      kind: 'lock',
      version: 1,
      protocolReference: demo.protocolReference,
      trialCode: demo.trial,
      cohortCode: demo.cohort,
    });
    const designId = randomUUID();
    const boundary = demo.boundary && toxicityBoundary({ n: numbers.n, theta: demo.boundary.theta, alpha: demo.boundary.alpha });
    const safety =
      demo.boundary && boundary
        ? {
            safety_rule: 'toxicity_boundary',
            tox_min_grade: demo.boundary.minGrade,
            tox_window_days: demo.boundary.windowDays,
            tox_theta: demo.boundary.theta,
            tox_alpha: demo.boundary.alpha,
            tox_bounds: JSON.stringify(boundary.bounds),
            tox_nominal_level: boundary.nominalLevel,
            tox_crossing_probability: boundary.crossingProbability,
          }
        : {};
    const intent = { action: 'design' as const, subjectId: cohort.id };
    const signature = await recordSignature(trx, {
      trialId,
      signer: { id: signer.id, email: signer.email },
      session: await demoSigningSession(trx, signer.id, intent, today),
      intent,
      meaning,
      subjectType: 'design',
      subjectId: designId,
      content: { trialId, cohortCode: demo.cohort, version: 1, selection: demo.selection, ...settings, ...numbers, ...safety },
    });
    await trx('design_versions').insert({
      id: designId,
      cohort_id: cohort.id,
      version: 1,
      selection: demo.selection,
      ...settings,
      r1: numbers.r1,
      n1: numbers.n1,
      r: numbers.r,
      n: numbers.n,
      en0: numbers.en0,
      pet0: numbers.pet0,
      type_i_error: numbers.typeIError,
      power: numbers.power,
      analysis_population: demo.analysisPopulation,
      interim_accrual: demo.interimAccrual,
      sponsor_sees_response: demo.sponsorSeesResponse,
      protocol_reference: demo.protocolReference,
      signature_id: signature.id,
      created_by: signer.id,
      ...safety,
    });
    await writeAudit(trx, {
      actorUserId: signer.id,
      trialId,
      entityType: 'design',
      entityId: designId,
      action: 'design_locked',
      after: {
        version: 1,
        selection: demo.selection,
        ...settings,
        r1: numbers.r1,
        n1: numbers.n1,
        r: numbers.r,
        n: numbers.n,
        ...(demo.boundary ? { safetyRule: 'toxicity_boundary', boundary: { theta: demo.boundary.theta, alpha: demo.boundary.alpha } } : {}),
        meaning,
      },
    });
    if (cohort.status !== 'draft') continue;
    for (const to of demo.path) {
      const stopping = to === 'stopped' && demo.stop;
      await transitionCohort(trx, {
        cohortId: cohort.id,
        to,
        // The pause at a full stage 1 is the system's doing; the other moves are the statistician's.
        actorUserId: to === 'interim_review' ? null : signer.id,
        reason: stopping ? demo.stop?.reason : null,
        stopCategory: stopping ? demo.stop?.category : null,
      });
    }
  }
}
