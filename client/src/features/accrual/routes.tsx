import { lazyPage, type Feature } from '../../lib/feature';

export const accrualFeature: Feature = {
  trialRoutes: [{ path: 'accrual', ...lazyPage(() => import('./accrual-page').then((m) => m.AccrualPage)) }],
  trialNav: [{ path: 'accrual', label: 'Accrual', order: 60 }],
};
