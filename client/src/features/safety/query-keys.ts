import { trialKeys } from '../trials';
import type { EventFilters } from './types';

/** Safety's query keys: a patient's events (with the toxicity status), the trial-wide list, the live state and what needs attention. */
export const safetyKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'safety'] as const,
  events: (trialId: string) => [...safetyKeys.all(trialId), 'events'] as const,
  patientEvents: (trialId: string, patientId: string) => [...safetyKeys.events(trialId), 'patient', patientId] as const,
  list: (trialId: string, filters: EventFilters) => [...safetyKeys.events(trialId), 'list', filters] as const,
  state: (trialId: string) => [...safetyKeys.all(trialId), 'state'] as const,
  attention: (trialId: string) => [...safetyKeys.all(trialId), 'attention'] as const,
};
