/**
 * How patients count under the protocol's analysis population — the one definition used by the
 * live evaluation, the accrual pause and the analysis of a data cut.
 * - all enrolled: every enrolled patient counts; a patient who is not evaluable counts as a
 *   non-responder;
 * - evaluable: patients who are not evaluable are left out and replaced by later enrolments.
 * Stage 1 is the first n1 counting patients in enrolment order; the rest are stage 2.
 */
export type AnalysisPopulation = 'all_enrolled' | 'evaluable';
export type Outcome = 'pending' | 'responder' | 'non_responder';

export type CountablePatient = {
  id: string;
  enrolmentSeq: number;
  outcome: Outcome;
  evaluable: boolean;
};

export type StageTally = { counted: number; decided: number; responders: number; pending: number };

export type Tally = StageTally & {
  enrolled: number;
  notEvaluable: number;
  stage1: StageTally;
  stage2: StageTally;
};

export function countsToward(patient: Pick<CountablePatient, 'evaluable'>, population: AnalysisPopulation): boolean {
  return population === 'all_enrolled' || patient.evaluable;
}

export function effectiveOutcome(patient: CountablePatient, population: AnalysisPopulation): Outcome {
  if (population === 'all_enrolled' && !patient.evaluable) return 'non_responder';
  return patient.outcome;
}

/** Stage of every patient: 1 for the first n1 counting patients, 2 after; single-stage designs are all stage 1. */
export function assignStages(patients: CountablePatient[], n1: number | null, population: AnalysisPopulation): Map<string, 1 | 2> {
  const stages = new Map<string, 1 | 2>();
  let counted = 0;
  for (const patient of [...patients].sort((a, b) => a.enrolmentSeq - b.enrolmentSeq)) {
    const inStage1 = n1 === null || counted < n1;
    stages.set(patient.id, inStage1 ? 1 : 2);
    if (countsToward(patient, population)) counted += 1;
  }
  return stages;
}

const empty = (): StageTally => ({ counted: 0, decided: 0, responders: 0, pending: 0 });

export function tally(patients: CountablePatient[], n1: number | null, population: AnalysisPopulation): Tally {
  const stages = assignStages(patients, n1, population);
  const total = empty();
  const byStage = { 1: empty(), 2: empty() };
  let notEvaluable = 0;
  for (const patient of patients) {
    if (!patient.evaluable) notEvaluable += 1;
    if (!countsToward(patient, population)) continue;
    const outcome = effectiveOutcome(patient, population);
    for (const bucket of [total, byStage[stages.get(patient.id) ?? 1]]) {
      bucket.counted += 1;
      if (outcome === 'pending') bucket.pending += 1;
      else bucket.decided += 1;
      if (outcome === 'responder') bucket.responders += 1;
    }
  }
  return { ...total, enrolled: patients.length, notEvaluable, stage1: byStage[1], stage2: byStage[2] };
}

/** A point of the responders path: after the k-th counting patient with a decided outcome, the responders so far. */
export type PathPoint = { evaluable: number; responders: number };

/**
 * Responders against patients with a decided outcome, counting patients in enrolment order: the
 * path the charts draw against the stopping boundaries. The live evaluation computes the same path
 * in SQL (evaluation.repository.ts, thinned for the chart); a data cut computes it here from its
 * frozen patients.
 */
export function responderPath(patients: CountablePatient[], population: AnalysisPopulation): PathPoint[] {
  const path: PathPoint[] = [];
  let responders = 0;
  for (const patient of [...patients].sort((a, b) => a.enrolmentSeq - b.enrolmentSeq)) {
    if (!countsToward(patient, population)) continue;
    const outcome = effectiveOutcome(patient, population);
    if (outcome === 'pending') continue;
    if (outcome === 'responder') responders += 1;
    path.push({ evaluable: path.length + 1, responders });
  }
  return path;
}
