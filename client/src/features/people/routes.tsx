import type { Feature } from '../../app/feature';

export const peopleFeature: Feature = {};
