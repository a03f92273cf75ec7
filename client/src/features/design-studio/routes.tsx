import type { Feature } from '../../app/feature';

export const designStudioFeature: Feature = {};
