import type { Feature } from '../../app/feature';

export const accrualFeature: Feature = {};
