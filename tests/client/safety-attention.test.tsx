/** Safety's part of Needs attention lists each site's items with their words and glyphs, and counts them by kind. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { screen, within } from '@testing-library/react';
import { SafetyAttention } from '../../client/src/features/safety';
import { renderWithApp, stubFetch } from './render';

afterEach(() => vi.unstubAllGlobals());

describe('SafetyAttention', () => {
  it('when a site has an event without a grade and a window closing, then both are listed under the site with a link to the patient', async () => {
    stubFetch({
      status: 200,
      body: {
        today: '2026-12-01',
        withinDays: 7,
        sites: [
          {
            siteId: 's1',
            siteCode: 'RVG',
            siteName: 'Riverside General',
            items: [
              { kind: 'event-awaits-assessment', message: 'The Headache with onset on 2026-11-29 still needs its grade.', date: '2026-11-29', patientId: 'p1', studyId: 'RVG-004', eventId: 'e1' },
              { kind: 'toxicity-window-closing', message: 'The toxicity window closes in 3 days, on 2026-12-04: record any adverse event with onset in the window before it is judged.', date: '2026-12-04', patientId: 'p2', studyId: 'RVG-005' },
            ],
          },
          { siteId: 's2', siteCode: 'HCC', siteName: 'Harbour Cancer Centre', items: [] },
        ],
      },
    });
    renderWithApp(<SafetyAttention trialId="t1" />);
    const table = await screen.findByRole('table', { name: 'Adverse events needing attention at RVG' });
    expect(within(table).getByRole('link', { name: 'RVG-004' })).toHaveAttribute('href', '/trials/t1/patients/p1');
    expect(within(table).getByText('Toxicity window closing')).toBeInTheDocument();
    expect(within(table).getByText(/still needs its grade/)).toBeInTheDocument();
    expect(screen.getByText('No adverse event needs attention at this site.')).toBeInTheDocument();
    expect(screen.getByText('within 7 days')).toBeInTheDocument();
  });
});
