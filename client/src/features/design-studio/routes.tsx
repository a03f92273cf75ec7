import { lazyPage, type Feature } from '../../lib/feature';

export const designStudioFeature: Feature = {
  trialRoutes: [{ path: 'design', ...lazyPage(() => import('./design-studio-page').then((m) => m.DesignStudioPage)) }],
  trialNav: [{ path: 'design', label: 'Design studio', roles: ['statistician', 'admin', 'monitor'], order: 20 }],
};
