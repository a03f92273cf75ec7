/** The Portfolio page and the weekly sponsor digest. Other features import this feature only through this file. */
export { weeklyDigests } from './digest.service.js';
export { portfolioRoutes } from './portfolio.routes.js';
