import { trialKeys } from '../trials';
import type { DesignSettings } from './types';

/** The Designs page's query keys. */
export const designKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'designs'] as const,
  /** A search that depends on the settings alone and may take seconds: kept apart from the trial's keys, so no trial write repeats it. */
  candidates: (trialId: string, settings: DesignSettings) => ['design-candidates', trialId, settings] as const,
};
