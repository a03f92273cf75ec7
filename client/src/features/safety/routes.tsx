import { lazyPage, type Feature } from '../../lib/feature';

export const safetyFeature: Feature = {
  trialRoutes: [{ path: 'safety', ...lazyPage(() => import('./safety-page').then((m) => m.SafetyPage)) }],
  trialNav: [{ path: 'safety', label: 'Safety', roles: ['coordinator', 'investigator', 'statistician', 'monitor'], order: 37 }],
};
