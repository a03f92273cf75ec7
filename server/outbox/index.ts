/** Development only: the Outbox page. Other features import this feature only through this file. */
export { outboxRoutes } from './outbox.routes.js';
