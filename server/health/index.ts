/** The health route load balancers read. Other features import this feature only through this file. */
export { healthRoutes } from './health.routes.js';
