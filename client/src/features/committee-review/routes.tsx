import type { Feature } from '../../app/feature';
import { ReviewPage } from './review-page';

export const committeeReviewFeature: Feature = {
  trialRoutes: [{ path: 'data-cuts/:cutId/review', element: <ReviewPage /> }],
};
