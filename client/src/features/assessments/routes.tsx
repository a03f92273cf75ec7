import type { Feature } from '../../app/feature';
import { NeedsAttentionPage } from './needs-attention-page';

export const assessmentsFeature: Feature = {
  trialRoutes: [{ path: 'needs-attention', element: <NeedsAttentionPage /> }],
  trialNav: [{ path: 'needs-attention', label: 'Needs attention', roles: ['coordinator', 'investigator', 'statistician', 'monitor'], order: 35 }],
};
