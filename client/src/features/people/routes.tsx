import { lazyPage, type Feature } from '../../lib/feature';

export const peopleFeature: Feature = {
  routes: [{ path: 'people', ...lazyPage(() => import('./sites-page').then((m) => m.SitesPage)) }],
  nav: [{ path: '/people', label: 'People & sites', roles: ['admin'], order: 80 }],
};
