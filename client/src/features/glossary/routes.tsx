import { lazyPage, type Feature } from '../../lib/feature';

export const glossaryFeature: Feature = {
  routes: [{ path: 'glossary', ...lazyPage(() => import('./glossary-page').then((m) => m.GlossaryPage)) }],
  nav: [{ path: '/glossary', label: 'Glossary', order: 85 }],
};
