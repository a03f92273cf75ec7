import { lazyPage, type Feature } from '../../lib/feature';

export const designsFeature: Feature = {
  trialRoutes: [{ path: 'designs', ...lazyPage(() => import('./designs-page').then((m) => m.DesignsPage)) }],
  trialNav: [{ path: 'designs', label: 'Designs', roles: ['statistician', 'admin', 'monitor'], order: 20 }],
};
