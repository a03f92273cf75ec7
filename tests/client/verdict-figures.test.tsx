/**
 * The Trial overview's evaluation panel shows what the API says about a verdict: patients enrolled
 * at risk, what could still change it, and at a final analysis the primary p-value beside its
 * sensitivity figure, with the sentence when they disagree. The verdicts are the engine's own.
 */
import { describe, expect, it } from 'vitest';
import { screen } from '@testing-library/react';
import { EvaluationPanel } from '../../client/src/features/trial-overview/evaluation-panel';
import { describeVerdict, verdictFigures } from '../../server/evaluation/verdict';
import type { LiveCohort } from '../../client/src/features/trial-overview/get-evaluation';
import type { StageTally, Tally } from '../../server/evaluation/counting';
import { renderWithApp, stubFetch } from './render';

const stage = (counted: number, decided: number, responders: number): StageTally => ({ counted, decided, responders, pending: counted - decided });

function cohort(design: { r1: number; n1: number; r: number; n: number; p0: number; alpha: number }, stage1: StageTally, stage2: StageTally, status: 'enrolling_stage_1' | 'final_analysis'): LiveCohort {
  const t: Tally = {
    counted: stage1.counted + stage2.counted,
    decided: stage1.decided + stage2.decided,
    responders: stage1.responders + stage2.responders,
    pending: stage1.pending + stage2.pending,
    enrolled: stage1.counted + stage2.counted,
    notEvaluable: 0,
    stage1,
    stage2,
  };
  return {
    cohortId: 'c1',
    cohortCode: 'MAIN',
    cohortName: 'All patients',
    status,
    design: { version: 1, selection: 'optimal', p1: design.p0 + 0.2, beta: 0.1, analysisPopulation: 'all_enrolled', interimAccrual: 'continue_at_risk', typeIError: 0.05, power: 0.8, sponsorSeesResponse: false, ...design },
    enrolled: t.enrolled,
    counted: t.counted,
    decided: t.decided,
    pending: t.pending,
    responders: t.responders,
    notEvaluable: 0,
    stage1,
    stage2,
    rate: null,
    test: null,
    rule: describeVerdict(verdictFigures(design, t, status === 'final_analysis' ? 'final' : 'stage-1'), design),
    earlyDetermination: null,
    accrual: null,
    notes: [],
    path: [],
  };
}

const evaluation = (c: LiveCohort) => ({ status: 200, body: { trialId: 't1', confLevel: 0.95, cautions: ['Decision support only.'], cohorts: [c] } });

describe('the evaluation panel', () => {
  it('when stage-2 patients were enrolled at risk, then the panel shows how many and the sentence saying the stage-1 rule leaves them out', async () => {
    stubFetch(evaluation(cohort({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 }, stage(13, 13, 3), stage(2, 2, 1), 'enrolling_stage_1')));
    renderWithApp(<EvaluationPanel trialId="t1" />);
    expect(await screen.findByText('Enrolled at risk')).toBeInTheDocument();
    expect(screen.getByText(/^2 patients counted beyond the first n1 = 13 are stage-2 patients enrolled at risk/)).toBeInTheDocument();
    expect(screen.getByText(/The futility rule is met: stage 1 ended with 3 responders among its 13 patients/)).toBeInTheDocument();
  });

  it('when a final analysis has pending outcomes that can change it, then the panel says how many and never that patients remain', async () => {
    stubFetch(evaluation(cohort({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 }, stage(13, 13, 5), stage(34, 30, 7), 'final_analysis')));
    const { container } = renderWithApp(<EvaluationPanel trialId="t1" />);
    expect(await screen.findByText(/4 pending outcomes can still change it/)).toBeInTheDocument();
    expect(container.textContent).not.toMatch(/remain/);
    // Said once: in the verdict's sentence, not again beside the verdict.
    expect(container.textContent?.match(/still change it/gi)).toHaveLength(1);
  });

  it('when the primary p-value and Koyama & Chen’s §4 figure disagree about p ≤ α, then both figures and the sentence are shown', async () => {
    stubFetch(evaluation(cohort({ r1: 7, n1: 22, r: 17, n: 46, p0: 0.3, alpha: 0.1 }, stage(22, 22, 10), stage(21, 21, 7), 'final_analysis')));
    renderWithApp(<EvaluationPanel trialId="t1" />);
    expect(await screen.findByText('Stage-wise p (primary)')).toBeInTheDocument();
    expect(screen.getByText('Koyama & Chen §4 p')).toBeInTheDocument();
    expect(screen.getByText(/disagree about p ≤ α = 0\.1\. The verdict follows the primary figure/)).toBeInTheDocument();
  });
});
