import type { Feature } from '../../app/feature';
import { AccrualPage } from './accrual-page';

export const accrualFeature: Feature = {
  trialRoutes: [{ path: 'accrual', element: <AccrualPage /> }],
  trialNav: [{ path: 'accrual', label: 'Accrual', order: 60 }],
};
