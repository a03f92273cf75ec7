/**
 * The protocol's toxicity definition applied to a patient, and a cohort's counts against its safety
 * rule. The definition (grade at or above a threshold, attribution possible or stronger, onset
 * within a window from the first dose) is common practice for dose-limiting toxicity; grade words
 * are the general grade descriptions of NCI CTCAE v5.0. The boundary is the continuous toxicity
 * boundary of Ivanova, Qaqish & Schell (2005), Biometrics 61:540–545, computed by the statistics
 * engine; the stage-1 toxicity limit is that of Bryant & Day (1995), Biometrics 51:1372–1383.
 */
import { describe, expect, it } from 'vitest';
import { countToxicities, deriveToxicity, safetyRuleState, windowEnd, type EventForToxicity } from '../../server/safety/toxicity.js';
import { toxicityBoundary } from '../../server/stats/index.js';
import type { SafetyCounts } from '../../server/safety/safety.schema.js';

const DEFINITION = { minGrade: 3, windowDays: 28 };
const ENROLLED = '2026-03-02';
const LAST_DAY = '2026-03-30';
const AFTER = '2026-04-15';

const event = (overrides: Partial<EventForToxicity>): EventForToxicity => ({
  id: overrides.id ?? 'e1',
  onsetOn: '2026-03-10',
  term: 'Neutropenia',
  grade: 3,
  attribution: 'possible',
  ...overrides,
});

const derive = (events: EventForToxicity[], today = AFTER) => deriveToxicity({ enrolledOn: ENROLLED, events, definition: DEFINITION, today });

describe('a patient against the toxicity definition', () => {
  it('when the window is given in days from enrolment, then its last day is enrolment plus the window', () => {
    expect(windowEnd(ENROLLED, 28)).toBe(LAST_DAY);
    expect(windowEnd('2024-02-28', 1)).toBe('2024-02-29');
  });

  it('when a grade 3 possibly related event starts in the window, then the patient is toxic and the sentence names the event', () => {
    const result = derive([event({ id: 'a' })], '2026-03-12');
    expect(result.status).toBe('toxic');
    expect(result.qualifyingEventId).toBe('a');
    expect(result.explanation[0]).toBe(
      'A toxicity is an adverse event of CTCAE grade 3 (Severe) or higher, possibly, probably or definitely related to the agent, with onset within 28 days of enrolment (enrolment stands for the first dose).',
    );
    expect(result.explanation).toContain('Toxicity: the Neutropenia with onset on 10 March 2026 (grade 3 (Severe), possibly related) meets the definition.');
  });

  it('when the only events are below the grade, unlikely related or after the window, then once the window closes the patient is not toxic, each event explained', () => {
    const result = derive([
      event({ id: 'low', grade: 2, attribution: 'definite', term: 'Fatigue' }),
      event({ id: 'unrelated', grade: 4, attribution: 'unlikely', term: 'Fracture' }),
      event({ id: 'late', grade: 4, attribution: 'probable', onsetOn: '2026-03-31', term: 'Febrile neutropenia' }),
    ]);
    expect(result.status).toBe('not_toxic');
    expect(result.qualifyingEventId).toBeNull();
    expect(result.explanation).toEqual(
      expect.arrayContaining([
        'The Fatigue with onset on 10 March 2026 does not count: grade 2 (Moderate) is below grade 3 (Severe).',
        'The Fracture with onset on 10 March 2026 does not count: it is unlikely related to the agent.',
        'The Febrile neutropenia with onset on 31 March 2026 does not count: its onset is after the window closed on 30 March 2026.',
        'No toxicity: the window closed on 30 March 2026 without an event that meets the definition.',
      ]),
    );
  });

  it('when an event starts on the last day of the window, then it counts; the window is open through that day and closed the day after', () => {
    expect(derive([event({ onsetOn: LAST_DAY })]).status).toBe('toxic');
    expect(derive([], LAST_DAY).status).toBe('not_assessable');
    expect(derive([], '2026-03-31').status).toBe('not_toxic');
  });

  it('when the window is still open and nothing qualifies yet, then the patient is not yet assessable', () => {
    const result = derive([event({ grade: 1 })], '2026-03-20');
    expect(result.status).toBe('not_assessable');
    expect(result.explanation.at(-1)).toBe('Not yet assessable: the window is open until 30 March 2026; an event with onset by then may still count.');
  });

  it('when an event in the window has no grade or no attribution yet but could count, then the patient stays not assessable after the window closes', () => {
    const noGrade = derive([event({ id: 'g', grade: null })]);
    expect(noGrade.status).toBe('not_assessable');
    expect(noGrade.awaitingEventIds).toEqual(['g']);
    expect(noGrade.explanation).toContain(
      'The Neutropenia with onset on 10 March 2026 would count if it is grade 3 or higher and at least possibly related: its grade is not recorded yet.',
    );
    expect(derive([event({ attribution: null })]).status).toBe('not_assessable');
    expect(derive([event({ grade: null, attribution: null })]).explanation.join(' ')).toContain('its grade and attribution are not recorded yet');
  });

  it('when an ungraded event is already unrelated, or a graded one below the threshold lacks attribution, then it cannot count and the patient is not toxic', () => {
    expect(derive([event({ grade: null, attribution: 'unrelated' })]).status).toBe('not_toxic');
    expect(derive([event({ grade: 2, attribution: null })]).status).toBe('not_toxic');
  });

  it('when several events qualify, then the first by onset is named and the others counted', () => {
    const result = derive([event({ id: 'later', onsetOn: '2026-03-20', grade: 4 }), event({ id: 'first', onsetOn: '2026-03-05' })]);
    expect(result.qualifyingEventId).toBe('first');
    expect(result.explanation.join(' ')).toContain('1 more event in the window meets it too');
  });

  it('when each patient is derived, then the cohort tally counts toxic, not toxic, not assessable, awaiting and stage 1', () => {
    const patients = [
      { stage: 1 as const, derivation: derive([event({})]) },
      { stage: 1 as const, derivation: derive([]) },
      { stage: 2 as const, derivation: derive([event({ grade: null })]) },
      { stage: 2 as const, derivation: derive([], '2026-03-10') },
    ];
    expect(countToxicities(patients)).toEqual({ enrolled: 4, toxic: 1, notToxic: 1, notAssessable: 2, awaitingAssessment: 1, stage1: { enrolled: 2, toxic: 1, notToxic: 1 } });
  });
});

const counts = (toxic: number, notToxic: number, stage1 = { toxic: 0, notToxic: 0 }): SafetyCounts => ({
  enrolled: toxic + notToxic,
  toxic,
  notToxic,
  notAssessable: 0,
  awaitingAssessment: 0,
  stage1: { enrolled: stage1.toxic + stage1.notToxic, ...stage1 },
});

describe('a cohort against its safety rule', () => {
  // Ivanova, Qaqish & Schell (2005) boundary for n 43, θ 0.25, α 0.10, from the statistics engine.
  const { bounds } = toxicityBoundary({ n: 43, theta: 0.25, alpha: 0.1 });

  it('when the engine gives the boundary, then it starts where the test relies on it (no stop before 3 patients, b_3 = 3, b_4 = b_5 = 4)', () => {
    expect(bounds.slice(0, 5)).toEqual([null, null, 3, 4, 4]);
  });

  it('when the toxicities among the assessable patients reach b_k, then the boundary is crossed', () => {
    const state = safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(3, 0));
    expect(state).toMatchObject({ rule: 'toxicity_boundary', crossed: true, bound: 3, toNextStop: 0, assessable: 3, toxicities: 3 });
  });

  it('when below the boundary, then the distance is the least run of further toxicities that would reach it', () => {
    const state = safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(2, 1));
    // k = 3 with 2 toxic: one more makes 3 of 4 (b_4 = 4, not yet), two more make 4 of 5 (b_5 = 4).
    expect(state).toMatchObject({ crossed: false, bound: 3, toNextStop: 2 });
  });

  it('when the distance is checked against adding toxic patients one by one, then it agrees for every reachable state', () => {
    for (let k = 0; k <= bounds.length; k += 1) {
      for (let y = 0; y <= k; y += 1) {
        const state = safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(y, k - y));
        if (state.rule !== 'toxicity_boundary' || state.crossed) continue;
        let stepped: number | null = null;
        for (let m = 1; k + m <= bounds.length && stepped === null; m += 1) {
          if (safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(y + m, k - y)).crossed) stepped = m;
        }
        expect(state.toNextStop, `k ${k}, y ${y}`).toBe(stepped);
      }
    }
  });

  it('when no stop is possible yet, then the bound is null and nothing is crossed', () => {
    expect(safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(2, 0))).toMatchObject({ bound: null, crossed: false, toNextStop: 1 });
  });

  it('when more patients are assessable than n, then the boundary at n applies', () => {
    const state = safetyRuleState({ rule: 'toxicity_boundary', bounds }, counts(bounds[42] as number, 44 - (bounds[42] as number)));
    expect(state).toMatchObject({ beyondN: true, bound: bounds[42], crossed: true });
  });

  it('when a Bryant–Day stage 1 has more than t1 toxicities, then the stage-1 limit is crossed; at t1 it is not', () => {
    const rule = { rule: 'bryant_day' as const, n1: 19, t1: 7, n: 33, t: 10 };
    expect(safetyRuleState(rule, counts(7, 5, { toxic: 7, notToxic: 5 }))).toMatchObject({ crossed: false, toStage1Limit: 1, finalLimitExceeded: false });
    expect(safetyRuleState(rule, counts(8, 5, { toxic: 8, notToxic: 5 }))).toMatchObject({ crossed: true, toStage1Limit: 0 });
    expect(safetyRuleState(rule, counts(11, 20, { toxic: 6, notToxic: 13 }))).toMatchObject({ crossed: false, finalLimitExceeded: true });
  });
});
