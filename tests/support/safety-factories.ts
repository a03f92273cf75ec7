/**
 * Builders for safety tests: a locked design with a safety rule (the continuous toxicity boundary
 * computed by the statistics engine, or a Bryant–Day rule), and adverse events written straight
 * to the database, so a test can arrange a cohort near or over its rule without walking the API.
 */
import type { Db } from '../../server/db/knex.js';
import { toxicityBoundary } from '../../server/stats/index.js';
import type { TrialFixture } from './factories.js';
import { lockDesignDirectly, type DirectDesign } from './patient-factories.js';
import { daysFromToday } from './assessment-factories.js';

export type DirectSafetyRule =
  | { rule: 'toxicity_boundary'; theta: number; alpha: number; minGrade?: number; windowDays?: number }
  | { rule: 'bryant_day'; t1: number; t: number; toxAcceptable?: number; toxUnacceptable?: number; alphaT?: number; minGrade?: number; windowDays?: number };

/** Locks a design (see `lockDesignDirectly`) with the safety rule in its version; the boundary's n is the design's n. */
export async function lockSafetyDesignDirectly(db: Db, design: DirectDesign, safety: DirectSafetyRule): Promise<{ designId: string; bounds: Array<number | null> | null }> {
  const n = design.n ?? 43;
  const definition = { safety_rule: safety.rule, tox_min_grade: safety.minGrade ?? 3, tox_window_days: safety.windowDays ?? 28 };
  if (safety.rule === 'toxicity_boundary') {
    const boundary = toxicityBoundary({ n, theta: safety.theta, alpha: safety.alpha });
    const { designId } = await lockDesignDirectly(db, {
      ...design,
      columns: {
        ...definition,
        tox_theta: safety.theta,
        tox_alpha: safety.alpha,
        tox_bounds: JSON.stringify(boundary.bounds),
        tox_nominal_level: boundary.nominalLevel,
        tox_crossing_probability: boundary.crossingProbability,
      },
    });
    return { designId, bounds: boundary.bounds };
  }
  const { designId } = await lockDesignDirectly(db, {
    ...design,
    columns: {
      ...definition,
      t1: safety.t1,
      t: safety.t,
      tox_acceptable: safety.toxAcceptable ?? 0.2,
      tox_unacceptable: safety.toxUnacceptable ?? 0.4,
      alpha_t: safety.alphaT ?? 0.15,
      attained_alpha_t: 0.1,
      en_high_toxicity: n,
    },
  });
  return { designId, bounds: null };
}

export type DirectEvent = {
  onsetOn?: string;
  term?: string;
  grade?: number | null;
  attribution?: 'unrelated' | 'unlikely' | 'possible' | 'probable' | 'definite' | null;
  serious?: boolean;
  outcome?: string;
};

/** Adverse events of one patient, as if entered by the site (defaults: a grade 3 possibly related neutropenia). */
export async function addEventsDirectly(db: Db, input: { trialId: string; patientId: string; events: DirectEvent[] }): Promise<string[]> {
  if (input.events.length === 0) return [];
  const rows = await db('adverse_events')
    .insert(
      input.events.map((e) => ({
        trial_id: input.trialId,
        patient_id: input.patientId,
        onset_on: e.onsetOn ?? daysFromToday(-1),
        term: e.term ?? 'Neutropenia',
        grade: e.grade === undefined ? 3 : e.grade,
        attribution: e.attribution === undefined ? 'possible' : e.attribution,
        serious: e.serious ?? false,
        outcome: e.outcome ?? 'recovering',
      })),
    )
    .returning('id');
  return rows.map((r: { id: string }) => r.id);
}

const matrixEvents = new Map<string, Promise<string>>();

/** One adverse event of a patient, shared by the event routes of the matrix and the cross-site checks. */
export function matrixEvent(db: Db, trial: TrialFixture, patientId: string): Promise<string> {
  if (!matrixEvents.has(patientId)) {
    matrixEvents.set(patientId, addEventsDirectly(db, { trialId: trial.trialId, patientId, events: [{ onsetOn: daysFromToday(-100), grade: 2 }] }).then(([id]) => id));
  }
  return matrixEvents.get(patientId) as Promise<string>;
}
