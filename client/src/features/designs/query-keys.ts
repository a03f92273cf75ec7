import { trialKeys } from '../trials';
import type { BryantDayCharacteristicsInput, SafetyDesignSettings, ToxicityBoundarySettings } from '../../../../server/safety/safety.schema';
import type { DesignSettings } from './types';

/** The Designs page's query keys. */
export const designKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'designs'] as const,
  /** A search that depends on the settings alone and may take seconds: kept apart from the trial's keys, so no trial write repeats it. */
  candidates: (trialId: string, settings: DesignSettings) => ['design-candidates', trialId, settings] as const,
  /** Likewise the Bryant–Day search and the safety characteristics: pure calculations of their settings. */
  safetyCandidates: (trialId: string, settings: SafetyDesignSettings) => ['safety-design-candidates', trialId, settings] as const,
  bryantDayGrid: (trialId: string, input: BryantDayCharacteristicsInput) => ['bryant-day-grid', trialId, input] as const,
  boundary: (trialId: string, settings: ToxicityBoundarySettings) => ['toxicity-boundary', trialId, settings] as const,
};
