import { lazyPage, type Feature } from '../../lib/feature';

export const peopleFeature: Feature = {
  routes: [
    { path: 'people', ...lazyPage(() => import('./sites-page').then((m) => m.SitesPage)) },
    { path: 'new-trial', ...lazyPage(() => import('./new-trial-page').then((m) => m.NewTrialPage)) },
  ],
  nav: [{ path: '/people', label: 'People & sites', roles: ['admin'], order: 80 }],
  trialRoutes: [{ path: 'people', ...lazyPage(() => import('./trial-people-page').then((m) => m.TrialPeoplePage)) }],
  trialNav: [{ path: 'people', label: 'People & sites', roles: ['admin', 'statistician'], order: 80 }],
};
