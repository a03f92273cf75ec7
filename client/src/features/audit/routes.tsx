import type { Feature } from '../../app/feature';
import { AuditPage } from './audit-page';

export const auditFeature: Feature = {
  trialRoutes: [{ path: 'audit', element: <AuditPage /> }],
  trialNav: [{ path: 'audit', label: 'Audit trail', roles: ['statistician', 'admin'], order: 85 }],
};
