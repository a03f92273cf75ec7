/** The signed-in user and their memberships. Other features import this feature only through this file. */
export { meRoutes } from './me.routes.js';
