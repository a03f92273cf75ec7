/** Every feature of the client; the router and the navigation are built from this list. */
import type { Feature, NavItem } from '../lib/feature';
import { portfolioFeature } from '../features/portfolio/routes';
import { trialOverviewFeature } from '../features/trial-overview/routes';
import { trialsFeature } from '../features/trials/routes';
import { peopleFeature } from '../features/people/routes';
import { designsFeature } from '../features/designs/routes';
import { patientsFeature } from '../features/patients/routes';
import { assessmentsFeature } from '../features/assessments/routes';
import { safetyFeature } from '../features/safety/routes';
import { dataCutsFeature } from '../features/data-cuts/routes';
import { committeeReviewFeature } from '../features/committee-review/routes';
import { accrualFeature } from '../features/accrual/routes';
import { auditFeature } from '../features/audit/routes';
import { outboxFeature } from '../features/outbox/routes';
import { glossaryFeature } from '../features/glossary/routes';

export const features: Feature[] = [
  portfolioFeature,
  trialOverviewFeature,
  trialsFeature,
  peopleFeature,
  designsFeature,
  patientsFeature,
  assessmentsFeature,
  safetyFeature,
  dataCutsFeature,
  committeeReviewFeature,
  accrualFeature,
  auditFeature,
  glossaryFeature,
  outboxFeature,
];

const byOrder = (a: NavItem, b: NavItem) => a.order - b.order;
export const globalNav: NavItem[] = features.flatMap((f) => f.nav ?? []).sort(byOrder);
export const trialNav: NavItem[] = features.flatMap((f) => f.trialNav ?? []).sort(byOrder);
export const globalRoutes = features.flatMap((f) => f.routes ?? []);
export const trialRoutes = features.flatMap((f) => f.trialRoutes ?? []);
