import { lazyPage, type Feature } from '../../lib/feature';

export const auditFeature: Feature = {
  trialRoutes: [{ path: 'audit', ...lazyPage(() => import('./audit-page').then((m) => m.AuditPage)) }],
  trialNav: [{ path: 'audit', label: 'Audit trail', roles: ['statistician', 'admin'], order: 85 }],
};
