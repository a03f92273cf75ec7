import { describe, expect, it } from 'vitest';
import { assignStages, tally, type CountablePatient } from '../../server/evaluation/counting.js';

const patient = (seq: number, outcome: CountablePatient['outcome'], evaluable = true): CountablePatient => ({
  id: `p${seq}`,
  enrolmentSeq: seq,
  outcome,
  evaluable,
});

describe('counting patients under the analysis population', () => {
  const patients = [patient(1, 'responder'), patient(2, 'pending', false), patient(3, 'non_responder'), patient(4, 'responder'), patient(5, 'pending')];

  it('when all enrolled count, then a non-evaluable patient is a non-responder and fills a stage-1 place', () => {
    const t = tally(patients, 3, 'all_enrolled');
    expect(t).toMatchObject({ enrolled: 5, counted: 5, decided: 4, responders: 2, pending: 1, notEvaluable: 1 });
    expect(t.stage1).toEqual({ counted: 3, decided: 3, responders: 1, pending: 0 });
    expect(t.stage2).toEqual({ counted: 2, decided: 1, responders: 1, pending: 1 });
  });

  it('when only evaluable patients count, then a non-evaluable patient is replaced by the next enrolment', () => {
    const stages = assignStages(patients, 3, 'evaluable');
    expect([...stages.values()]).toEqual([1, 1, 1, 1, 2]);
    const t = tally(patients, 3, 'evaluable');
    expect(t.stage1).toEqual({ counted: 3, decided: 3, responders: 2, pending: 0 });
    expect(t.stage2).toEqual({ counted: 1, decided: 0, responders: 0, pending: 1 });
  });

  it('when the design is single-stage, then everyone is stage 1', () => {
    expect([...assignStages(patients, null, 'all_enrolled').values()]).toEqual([1, 1, 1, 1, 1]);
  });
});
