import { lazyPage, type Feature } from '../../lib/feature';

export const dataCutsFeature: Feature = {
  trialRoutes: [
    { path: 'data-cuts', ...lazyPage(() => import('./data-cuts-page').then((m) => m.DataCutsPage)) },
    { path: 'data-cuts/:cutId', ...lazyPage(() => import('./cut-page').then((m) => m.CutPage)) },
  ],
  trialNav: [{ path: 'data-cuts', label: 'Data cuts', roles: ['statistician', 'monitor'], order: 50 }],
};
