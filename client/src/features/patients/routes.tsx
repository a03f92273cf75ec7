import type { Feature } from '../../app/feature';

export const patientsFeature: Feature = {};
