import { lazyPage, type Feature } from '../../lib/feature';

export const committeeReviewFeature: Feature = {
  trialRoutes: [{ path: 'data-cuts/:cutId/review', ...lazyPage(() => import('./review-page').then((m) => m.ReviewPage)) }],
};
