import type { Feature } from '../../app/feature';
import { OverviewPage } from './overview-page';

export const trialOverviewFeature: Feature = {
  trialRoutes: [{ index: true, element: <OverviewPage /> }],
  trialNav: [{ path: '', label: 'Trial overview', order: 10 }],
};
