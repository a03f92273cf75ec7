/**
 * After an adverse-event write: the patient's events and the lists, the live safety state, and —
 * when the write paused the cohort's accrual — everything the cohort's status frames.
 */
import { useInvalidate } from '../../lib/invalidate';
import { wholeTrialKeys } from '../trials';
import { safetyKeys } from './query-keys';

export function useAfterEventWrite(trialId: string) {
  const invalidate = useInvalidate();
  return (paused: boolean) => invalidate(...(paused ? wholeTrialKeys(trialId) : [safetyKeys.all(trialId)]));
}
