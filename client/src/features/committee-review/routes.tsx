import type { Feature } from '../../app/feature';

export const committeeReviewFeature: Feature = {};
