import type { Feature } from '../../app/feature';
import { NewTrialPage } from './new-trial-page';
import { SitesPage } from './sites-page';
import { TrialPeoplePage } from './trial-people-page';

export const peopleFeature: Feature = {
  routes: [
    { path: 'people', element: <SitesPage /> },
    { path: 'new-trial', element: <NewTrialPage /> },
  ],
  nav: [{ path: '/people', label: 'People & sites', roles: ['admin'], order: 80 }],
  trialRoutes: [{ path: 'people', element: <TrialPeoplePage /> }],
  trialNav: [{ path: 'people', label: 'People & sites', roles: ['admin', 'statistician'], order: 80 }],
};
