/** The Trial overview's live safety shows what the server's visibility rule sent: live figures, or why they are absent with the released cut's safety figures under its date. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { screen, within } from '@testing-library/react';
import { SafetyOverview } from '../../client/src/features/safety';
import { renderWithApp, stubFetch } from './render';

afterEach(() => vi.unstubAllGlobals());

const lockedRule = {
  version: 1,
  safetyRule: 'toxicity_boundary',
  definition: { minGrade: 3, windowDays: 28 },
  boundary: { theta: 0.25, alpha: 0.1, n: 43, nominalLevel: 0.02, crossingProbability: 0.09, bounds: [null, null, 3] },
  bryantDay: null,
};
const operational = {
  cohortId: 'c1',
  cohortCode: 'MAIN',
  cohortName: 'All patients',
  status: 'enrolling_stage_1',
  safetyPause: null,
  sponsorSeesResponse: false,
  lockedRule,
  definition: 'A toxicity is an adverse event of CTCAE grade 3 (Severe) or higher, possibly, probably or definitely related to the agent, with onset within 28 days of enrolment (enrolment stands for the first dose).',
};
const counts = { enrolled: 5, toxic: 2, notToxic: 2, notAssessable: 1, awaitingAssessment: 0, stage1: { enrolled: 5, toxic: 2, notToxic: 2 } };
const state = { rule: 'toxicity_boundary', toxicities: 2, assessable: 4, n: 43, bound: 4, crossed: false, toNextStop: 2, beyondN: false };
const safety = (cohort: object) => ({ trialId: 't1', confLevel: 0.95, cautions: ['Decision support only.'], cohorts: [cohort] });

describe('SafetyOverview', () => {
  it('when the statistician’s answer carries live figures, then the toxicities, the exact interval and the distance to the boundary are drawn', async () => {
    stubFetch({
      status: 200,
      body: safety({ ...operational, counts, rate: { toxicities: 2, assessable: 4, estimate: 0.5, ci: [0.068, 0.932], confLevel: 0.95, method: 'clopper-pearson' }, state, sentences: ['2 toxicities among 4 assessable patients; the boundary there is 4.'] }),
    });
    renderWithApp(<SafetyOverview trialId="t1" />);
    const block = await screen.findByRole('region', { name: 'Safety of cohort MAIN' });
    expect(within(block).getByText('2 / 4')).toBeInTheDocument();
    expect(within(block).getByText(/95% exact CI/)).toBeInTheDocument();
    expect(within(block).getByText('To the boundary')).toBeInTheDocument();
    expect(within(block).queryByRole('note')).toBeNull();
  });

  it('when a sponsor’s answer has no live figures but a released cut, then the reason is shown and the frozen figures sit under the cut’s date', async () => {
    stubFetch({
      status: 200,
      body: safety({
        ...operational,
        efficacyHidden: 'Trial-wide figures reach sponsors only once a committee decision releases a data cut.',
        released: {
          safetyRule: 'toxicity_boundary',
          counts: { ...counts, toxic: 1, notToxic: 3 },
          toxicityRate: { toxicities: 1, assessable: 4, estimate: 0.25, ci: [0.006, 0.806], confLevel: 0.95, method: 'clopper-pearson' },
          state: { ...state, toxicities: 1 },
          joint: null,
          sentences: ['1 toxicity among 4 assessable patients; the boundary there is 4.'],
          cutId: 'cut-1',
          cutSeq: 1,
          cutAt: '2026-03-03T09:00:00.000Z',
          label: 'as of the data cut of 3 March 2026',
        },
      }),
    });
    renderWithApp(<SafetyOverview trialId="t1" />);
    const frozen = await screen.findByRole('region', { name: 'Released safety figures, as of the data cut of 3 March 2026' });
    expect(within(frozen).getByText('1 / 4')).toBeInTheDocument();
    expect(screen.getByRole('note')).toHaveTextContent('reach sponsors only once');
    expect(screen.getAllByText('Toxicities')).toHaveLength(1);
    expect(screen.getByText(/A toxicity is an adverse event of CTCAE grade 3/)).toBeInTheDocument();
  });
});
