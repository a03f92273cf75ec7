import type { Feature } from '../../app/feature';
import { DataCutsPage } from './data-cuts-page';
import { CutPage } from './cut-page';

export const dataCutFeature: Feature = {
  trialRoutes: [
    { path: 'data-cuts', element: <DataCutsPage /> },
    { path: 'data-cuts/:cutId', element: <CutPage /> },
  ],
  trialNav: [{ path: 'data-cuts', label: 'Data cuts', roles: ['statistician', 'monitor'], order: 50 }],
};
