import type { Feature } from '../../app/feature';

export const auditFeature: Feature = {};
