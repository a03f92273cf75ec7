/**
 * After a patient write: each mutation names what it changed. A write that completed stage 1 moved
 * its cohort to interim review, which every page of the trial shows: then the whole trial is stale.
 */
import type { QueryKey } from '@tanstack/react-query';
import { useInvalidate } from '../../lib/invalidate';
import { wholeTrialKeys } from '../trials';

export function useAfterPatientWrite(trialId: string) {
  const invalidate = useInvalidate();
  return (changed: QueryKey[], cohortMoved = false) => invalidate(...(cohortMoved ? wholeTrialKeys(trialId) : changed));
}
