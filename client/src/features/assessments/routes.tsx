import { lazyPage, type Feature } from '../../lib/feature';

export const assessmentsFeature: Feature = {
  trialRoutes: [{ path: 'needs-attention', ...lazyPage(() => import('./needs-attention-page').then((m) => m.NeedsAttentionPage)) }],
  trialNav: [{ path: 'needs-attention', label: 'Needs attention', roles: ['coordinator', 'investigator', 'statistician', 'monitor'], order: 35 }],
};
