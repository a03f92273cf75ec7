/** After a patient write: the trial (cohort status may have moved), its patients and its evaluation are stale. */
import { useQueryClient } from '@tanstack/react-query';
import { trialQueryOptions } from '../trials';

export function useAfterPatientWrite(trialId: string) {
  const queryClient = useQueryClient();
  return () => queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey });
}
