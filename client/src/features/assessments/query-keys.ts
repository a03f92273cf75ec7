import { trialKeys } from '../trials';

/** The assessments' query keys: each patient's assessments with their derivation, and the trial's Needs attention list. */
export const assessmentKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'assessments'] as const,
  patient: (trialId: string, patientId: string) => [...assessmentKeys.all(trialId), patientId] as const,
  needsAttention: (trialId: string) => [...trialKeys.scope(trialId), 'needs-attention'] as const,
};
