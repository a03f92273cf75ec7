/** Every route of the server, feature by feature: the one list the app mounts and the matrix test walks. */
import type { RouteSpec } from './routes.js';
import type { OidcClient } from '../auth/oidc.js';
import { authRoutes } from '../auth/auth.routes.js';
import { healthRoutes } from '../health/health.routes.js';
import { meRoutes } from '../me/me.routes.js';
import { trialsRoutes } from '../trials/trials.routes.js';
import { peopleRoutes } from '../people/people.routes.js';
import { designStudioRoutes } from '../design-studio/design-studio.routes.js';
import { patientsRoutes } from '../patients/patients.routes.js';
import { assessmentsRoutes } from '../assessments/assessments.routes.js';
import { dataCutsRoutes } from '../data-cuts/data-cuts.routes.js';
import { portfolioRoutes } from '../portfolio/portfolio.routes.js';
import { accrualRoutes } from '../accrual/accrual.routes.js';
import { outboxRoutes } from '../outbox/outbox.routes.js';
import { auditRoutes } from '../audit/audit.routes.js';

export function routeTable(oidc: OidcClient): RouteSpec[] {
  return [
    ...authRoutes(oidc),
    ...healthRoutes,
    ...meRoutes,
    ...trialsRoutes,
    ...peopleRoutes,
    ...designStudioRoutes,
    ...patientsRoutes,
    ...assessmentsRoutes,
    ...dataCutsRoutes,
    ...portfolioRoutes,
    ...accrualRoutes,
    ...outboxRoutes,
    ...auditRoutes,
  ];
}
