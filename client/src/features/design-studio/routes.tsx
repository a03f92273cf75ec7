import type { Feature } from '../../app/feature';
import { DesignStudioPage } from './design-studio-page';

export const designStudioFeature: Feature = {
  trialRoutes: [{ path: 'design', element: <DesignStudioPage /> }],
  trialNav: [{ path: 'design', label: 'Design studio', roles: ['statistician', 'admin', 'monitor'], order: 20 }],
};
