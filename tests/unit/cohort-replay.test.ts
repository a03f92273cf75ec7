/**
 * `replayCohort` tells, for changes written together, what the accrual rules would have met one
 * change at a time. Checked against the plain definition: after each change, restage the whole
 * cohort with `assignStages` (when a change of evaluability can move stages) and test stage 1's
 * completion with the count of counting patients.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { replayCohort } from '../../server/patients/accrual-rules.js';
import { assignStages, countsToward, type CountablePatient } from '../../server/evaluation/counting.js';
import type { LockedDesign } from '../../server/designs/index.js';
import type { Cohort } from '../../server/trials/index.js';

const design = (n1: number | null, population: LockedDesign['analysisPopulation']) => ({ n1, r1: n1 === null ? null : 1, analysisPopulation: population }) as LockedDesign;

/** One change at a time, the whole cohort restaged after each that changes evaluability. */
function oneAtATime(d: LockedDesign, status: Cohort['status'], patients: CountablePatient[], stored: Map<string, 1 | 2>, changes: Array<{ patientId: string; evaluable: boolean }>) {
  const state = patients.map((p) => ({ ...p }));
  let stages = new Map(stored);
  let completes: number | undefined;
  const met: Array<1 | 2> = [];
  changes.forEach((change, index) => {
    const patient = state.find((p) => p.id === change.patientId) as CountablePatient;
    met.push(stages.get(patient.id) ?? 1);
    const moved = patient.evaluable !== change.evaluable;
    patient.evaluable = change.evaluable;
    if (moved && d.n1 !== null && d.analysisPopulation === 'evaluable') stages = assignStages(state, d.n1, d.analysisPopulation);
    const counted = state.filter((p) => countsToward(p, d.analysisPopulation)).length;
    if (completes === undefined && status === 'enrolling_stage_1' && d.n1 !== null && counted >= d.n1) completes = index;
  });
  return { stages: met, completesStageOne: completes };
}

const cohortArb = fc
  .record({
    evaluable: fc.array(fc.boolean(), { minLength: 1, maxLength: 12 }),
    n1: fc.option(fc.integer({ min: 1, max: 10 }), { nil: null }),
    population: fc.constantFrom<LockedDesign['analysisPopulation']>('all_enrolled', 'evaluable'),
    status: fc.constantFrom<Cohort['status']>('enrolling_stage_1', 'interim_review', 'enrolling_stage_2'),
  })
  .chain((cohort) =>
    fc.record({
      cohort: fc.constant(cohort),
      // Each patient changes at most once in a file; the stored stages are the cohort's own.
      order: fc.shuffledSubarray(cohort.evaluable.map((_, i) => i)),
      next: fc.array(fc.boolean(), { minLength: cohort.evaluable.length, maxLength: cohort.evaluable.length }),
    }),
  );

describe('replaying changes to a cohort as the accrual rules meet them one at a time', () => {
  it('when random changes of evaluability are replayed, then each change meets the stage, and stage 1 completes at the change, that one change at a time gives', () => {
    fc.assert(
      fc.property(cohortArb, ({ cohort, order, next }) => {
        const patients = cohort.evaluable.map((evaluable, i) => ({ id: `p${i}`, enrolmentSeq: i + 1, outcome: 'pending' as const, evaluable }));
        const d = design(cohort.n1, cohort.population);
        const stored = assignStages(patients, cohort.n1, cohort.population);
        const changes = order.map((i) => ({ patientId: `p${i}`, evaluable: next[i] }));
        expect(replayCohort(d, cohort.status, patients, stored, changes)).toEqual(oneAtATime(d, cohort.status, patients, stored, changes));
      }),
      { numRuns: 500 },
    );
  });

  it('when a patient stops counting, then a later one moves back to stage 1 before its own change', () => {
    const patients = [true, true, true, true].map((evaluable, i) => ({ id: `p${i}`, enrolmentSeq: i + 1, outcome: 'pending' as const, evaluable }));
    const stored = new Map<string, 1 | 2>([['p0', 1], ['p1', 1], ['p2', 2], ['p3', 2]]);
    const replay = replayCohort(design(2, 'evaluable'), 'interim_review', patients, stored, [
      { patientId: 'p0', evaluable: false },
      { patientId: 'p2', evaluable: true },
    ]);
    expect(replay).toEqual({ stages: [1, 1], completesStageOne: undefined });
  });

  it('when the counted patients reach n1 at the second change, then stage 1 completes there', () => {
    const patients = [true, false, false].map((evaluable, i) => ({ id: `p${i}`, enrolmentSeq: i + 1, outcome: 'pending' as const, evaluable }));
    const stored = new Map<string, 1 | 2>([['p0', 1], ['p1', 1], ['p2', 1]]);
    const replay = replayCohort(design(3, 'evaluable'), 'enrolling_stage_1', patients, stored, [
      { patientId: 'p1', evaluable: true },
      { patientId: 'p2', evaluable: true },
    ]);
    expect(replay.completesStageOne).toBe(1);
  });

  it('when the stored stages were never restaged, then changes meet them until the first change of evaluability', () => {
    // An unlikely store (stage 2 with nobody counted before it), met as it is, as one change at a time would.
    const patients = [true, true].map((evaluable, i) => ({ id: `p${i}`, enrolmentSeq: i + 1, outcome: 'pending' as const, evaluable }));
    const stored = new Map<string, 1 | 2>([['p0', 2], ['p1', 2]]);
    const replay = replayCohort(design(5, 'evaluable'), 'enrolling_stage_2', patients, stored, [
      { patientId: 'p0', evaluable: true },
      { patientId: 'p1', evaluable: false },
    ]);
    expect(replay.stages).toEqual([2, 2]);
  });
});
