/** The Trial overview's evaluation shows what the server's visibility rule sent: released figures under their date, own sites' counts, or why figures are absent. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { screen, within } from '@testing-library/react';
import { EvaluationPanel } from '../../client/src/features/trial-overview/evaluation-panel';
import { renderWithApp, stubFetch } from './render';

afterEach(() => vi.unstubAllGlobals());

const design = { version: 1, selection: 'optimal', p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2, r1: 3, n1: 13, r: 12, n: 43, analysisPopulation: 'all_enrolled', interimAccrual: 'pause', sponsorSeesResponse: false, typeIError: 0.047, power: 0.8 };
const operational = { cohortId: 'c1', cohortCode: 'MAIN', cohortName: 'All patients', status: 'enrolling_stage_2', design, enrolled: 14, counted: 14, decided: 14, pending: 0, notEvaluable: 0 };
const released = {
  cohortId: 'c1',
  cutId: 'cut-1',
  cutSeq: 1,
  cutKind: 'interim',
  cutAt: '2026-03-03T09:00:00.000Z',
  releasedAt: '2026-03-05T09:00:00.000Z',
  label: 'as of the data cut of 3 March 2026',
  counts: { responders: 6, decided: 13, pending: 0 },
  responseRate: { responders: 6, decided: 13, estimate: 6 / 13, confLevel: 0.95, clopperPearson: [0.19, 0.75], wilson: [0.2, 0.7], jeffreys: [0.2, 0.7] },
  exactTest: { pValue: 0.0300, oneSidedLower: 0.22, alternative: 'greater', p0: 0.2 },
  rule: { stage: 'stage1', decision: 'continue', determinedEarly: false, remainingToDecide: 0, message: 'Stage 1 is passed: 6 responders among 13 exceed r1 = 3; continue to stage 2.', applied: 'stage1', note: null },
  inference: null,
  bayes: null,
};
const evaluation = (cohort: object) => ({ trialId: 't1', confLevel: 0.95, cautions: ['Decision support only.'], cohorts: [cohort] });

describe('EvaluationPanel', () => {
  it('when a coordinator’s evaluation carries released figures and own-site counts, then both are shown with their labels and the reason live figures are absent', async () => {
    stubFetch({
      status: 200,
      body: evaluation({
        ...operational,
        efficacyHidden: 'Trial-wide response figures reach site staff only once a committee decision releases a data cut.',
        released,
        ownSites: [{ cohortId: 'c1', siteId: 's1', siteCode: 'RVG', enrolled: 8, counted: 8, decided: 8, responders: 4, pending: 0 }],
      }),
    });
    renderWithApp(<EvaluationPanel trialId="t1" />);
    const frozen = await screen.findByRole('region', { name: 'Released figures, as of the data cut of 3 March 2026' });
    expect(within(frozen).getByText('6 / 13')).toBeInTheDocument();
    expect(within(frozen).getByText('0.0300')).toBeInTheDocument();
    expect(within(screen.getByRole('region', { name: 'Your sites' })).getByText(/4 responders among 8 patients with an outcome/)).toBeInTheDocument();
    expect(screen.getByRole('note')).toHaveTextContent('reach site staff only once');
    expect(screen.getAllByText('Response rate')).toHaveLength(1);
  });

  it('when the evaluation carries operational figures only (a trial manager), then no response figure is drawn', async () => {
    stubFetch({ status: 200, body: evaluation({ ...operational, efficacyHidden: 'Trial managers see operational figures only.' }) });
    renderWithApp(<EvaluationPanel trialId="t1" />);
    await screen.findByText('Trial managers see operational figures only.');
    expect(screen.getByText('Decided')).toBeInTheDocument();
    expect(screen.queryByText('Responders')).toBeNull();
    expect(screen.queryByText('Response rate')).toBeNull();
    expect(screen.queryByRole('region', { name: /Released figures/ })).toBeNull();
  });
});
