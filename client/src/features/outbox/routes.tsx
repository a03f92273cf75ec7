import { lazyPage, type Feature } from '../../lib/feature';

export const outboxFeature: Feature = {
  routes: [{ path: 'outbox', ...lazyPage(() => import('./outbox-page').then((m) => m.OutboxPage)) }],
  nav: [{ path: '/outbox', label: 'Outbox', order: 90, devOnly: true }],
};
