import type { Feature } from '../../app/feature';
import { OutboxPage } from './outbox-page';

export const outboxFeature: Feature = {
  routes: [{ path: 'outbox', element: <OutboxPage /> }],
  nav: [{ path: '/outbox', label: 'Outbox', order: 90, devOnly: true }],
};
