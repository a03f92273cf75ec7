import type { Feature } from '../../app/feature';

export const dataCutFeature: Feature = {};
