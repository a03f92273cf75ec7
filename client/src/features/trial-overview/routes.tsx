import type { Feature } from '../../lib/feature';
import { OverviewPage } from './overview-page';

export const trialOverviewFeature: Feature = {
  trialRoutes: [{ index: true, element: <OverviewPage /> }],
  trialNav: [{ path: '', label: 'Trial overview', order: 10 }],
};
