/**
 * Sign-in through OpenID Connect: the routes and the client of the identity provider (who may do
 * what is the shared server/auth/access.ts). Other features import this feature only through this
 * file.
 */
export { authRoutes } from './auth.routes.js';
export { createOidcClient } from './oidc.js';
export type { OidcClient } from './oidc.js';
