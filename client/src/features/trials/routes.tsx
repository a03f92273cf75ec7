import { lazyPage, type Feature } from '../../lib/feature';

export const trialsFeature: Feature = {
  routes: [{ path: 'new-trial', ...lazyPage(() => import('./new-trial-page').then((m) => m.NewTrialPage)) }],
  // A trial's set-up is read and edited on its People & sites page, beside its members.
  trialRoutes: [{ path: 'people', ...lazyPage(() => import('./trial-setup-page').then((m) => m.TrialSetupPage)) }],
  trialNav: [{ path: 'people', label: 'People & sites', roles: ['admin', 'statistician'], order: 80 }],
};
