/**
 * The safety section of a data cut, computed from its frozen copy only (the snapshot's design, the
 * frozen patients and adverse events), with the cut's date standing for "today" in the toxicity
 * windows — so the same cut always gives the same figures. Per cohort: events by CTCAE grade and
 * attribution, the patients judged against the locked toxicity definition (the same `deriveToxicity`
 * the live state is checked against), the toxicity rate with its exact interval, where the cohort
 * stood against its safety rule, and for a Bryant–Day design the joint response-and-toxicity verdict.
 * Numbers and states here; sentences from server/words. Pure: no database, no I/O.
 */
import { countToxicities, deriveToxicity, ruleOfDesign, safetyRuleState, toxicityRate, type ToxicityRate, type Attribution, type SafetyCounts, type SafetyRuleState } from '../safety/index.js';
import { describeJointVerdict, describeSafetyState, frozenEventsMissing, responseOnlySafety, toxicityDefinitionSentence, type JointVerdict } from '../words/index.js';
import type { Tally } from '../evaluation/index.js';
import type { CutAdverseEvent } from './cut-adverse-events.repository.js';
import type { CutCohort, CutDesign, CutPatient } from './data-cuts.repository.js';

const ATTRIBUTION_ORDER: Array<Attribution | 'not_assessed'> = ['unrelated', 'unlikely', 'possible', 'probable', 'definite', 'not_assessed'];

/** Events of one grade (null: not graded yet), by attribution. */
export type GradeRow = { grade: number | null; byAttribution: Record<Attribution | 'not_assessed', number>; total: number; serious: number };

export type CohortSafetyAnalysis = {
  cohortId: string;
  code: string;
  /** The cut froze adverse events (cuts frozen before safety monitoring did not). */
  eventsFrozen: boolean;
  safetyRule: NonNullable<CutDesign['safetyRule']>;
  definition: { minGrade: number; windowDays: number } | null;
  events: { total: number; serious: number; patients: number; byGrade: GradeRow[] };
  counts: SafetyCounts | null;
  toxicityRate: ToxicityRate | null;
  state: SafetyRuleState | null;
  joint: JointVerdict | null;
  /** Study IDs of the patients counted as toxic at the cut. */
  toxicPatients: string[];
  /** Per toxic patient, the first event (by onset) that meets the definition: the one the patient counts by. */
  qualifyingEventIds: string[];
  sentences: string[];
};

function eventsByGrade(events: CutAdverseEvent[]): GradeRow[] {
  const grades: Array<number | null> = [1, 2, 3, 4, 5, null];
  return grades
    .map((grade) => {
      const ofGrade = events.filter((e) => e.grade === grade);
      const byAttribution = Object.fromEntries(ATTRIBUTION_ORDER.map((a) => [a, ofGrade.filter((e) => (e.attribution ?? 'not_assessed') === a).length])) as GradeRow['byAttribution'];
      return { grade, byAttribution, total: ofGrade.length, serious: ofGrade.filter((e) => e.serious).length };
    })
    .filter((row) => row.grade !== null || row.total > 0);
}

/**
 * Bryant–Day's joint verdict at the cut: after stage 1, stop when responses ≤ r1 or toxicities > t1;
 * at n, promising when responses > r and toxicities ≤ t. Before a stage is complete, what is still open.
 */
export function jointVerdict(design: Pick<CutDesign, 'r1' | 'n1' | 'r' | 'n'>, rule: { t1: number; t: number }, response: Tally, state: Extract<SafetyRuleState, { rule: 'bryant_day' }>): JointVerdict {
  const r1 = design.r1 ?? -1;
  const n1 = design.n1 ?? design.n;
  const stage1 = { responses: response.stage1.responders, decided: response.stage1.decided, toxicities: state.stage1Toxicities, assessable: state.stage1Assessable };
  const final = { responses: response.responders, decided: response.decided, toxicities: state.toxicities, assessable: state.assessable };
  const base = { r1, n1, t1: rule.t1, r: design.r, n: design.n, t: rule.t, stage1, final };
  if (state.stage1Toxicities > rule.t1) return { ...base, verdict: 'stop_toxicity_stage1' };
  const stage1Complete = stage1.decided >= n1 && stage1.assessable >= n1;
  if (stage1Complete && stage1.responses <= r1) return { ...base, verdict: 'stop_response_stage1' };
  if (final.decided >= design.n && final.assessable >= design.n) {
    if (final.responses > design.r && final.toxicities <= rule.t) return { ...base, verdict: 'promising' };
    return { ...base, verdict: final.responses > design.r ? 'not_promising_toxicity' : 'not_promising_response' };
  }
  return { ...base, verdict: stage1Complete ? 'stage2_open' : 'stage1_open' };
}

export function cohortSafety(input: { cohort: CutCohort; patients: CutPatient[]; events: CutAdverseEvent[]; eventsFrozen: boolean; cutOn: string; response: Tally | null }): CohortSafetyAnalysis {
  const { cohort, patients, eventsFrozen } = input;
  const design = cohort.design;
  const ids = new Set(patients.map((p) => p.patientId));
  const events = input.events.filter((e) => ids.has(e.patientId));
  const summary = { total: events.length, serious: events.filter((e) => e.serious).length, patients: new Set(events.map((e) => e.patientId)).size, byGrade: eventsByGrade(events) };
  const safetyRule = design?.safetyRule ?? 'none';
  const definition = design?.toxicity ?? null;
  const empty = { cohortId: cohort.id, code: cohort.code, eventsFrozen, safetyRule, definition, events: summary, counts: null, toxicityRate: null, state: null, joint: null, toxicPatients: [], qualifyingEventIds: [] };
  if (!eventsFrozen) return { ...empty, sentences: [frozenEventsMissing()] };
  const rule = ruleOfDesign(design);
  if (!design || !definition || !rule) return { ...empty, sentences: [responseOnlySafety(design !== null)] };

  const derived = patients.map((p) => ({
    studyId: p.studyId,
    stage: p.stage === 2 ? (2 as const) : (1 as const),
    derivation: deriveToxicity({ enrolledOn: p.enrolledOn, events: events.filter((e) => e.patientId === p.patientId).map((e) => ({ ...e, id: e.eventId })), definition, today: input.cutOn }),
  }));
  const counts = countToxicities(derived);
  const state = safetyRuleState(rule, counts);
  const rate = toxicityRate(counts);
  const joint = state.rule === 'bryant_day' && rule.rule === 'bryant_day' && input.response ? jointVerdict(design, rule, input.response, state) : null;
  return {
    ...empty,
    counts,
    toxicityRate: rate,
    state,
    joint,
    toxicPatients: derived.filter((d) => d.derivation.status === 'toxic').map((d) => d.studyId),
    qualifyingEventIds: derived.flatMap((d) => (d.derivation.qualifyingEventId ? [d.derivation.qualifyingEventId] : [])),
    sentences: [toxicityDefinitionSentence(definition), ...describeSafetyState(state), ...(joint ? describeJointVerdict(joint) : [])],
  };
}
