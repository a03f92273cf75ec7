/**
 * After an assessment changes: the answer carries the fresh derivation, which may change the
 * patient's outcome, so the panel takes it directly and everything cached about the trial refreshes.
 */
import { useQueryClient } from '@tanstack/react-query';
import { trialQueryOptions } from '../trials';
import { assessmentsQueryOptions } from './get-assessments';
import type { AssessmentsView } from './types';

export function useAfterAssessmentWrite(trialId: string, patientId: string) {
  const queryClient = useQueryClient();
  return (view: AssessmentsView) => {
    queryClient.setQueryData(assessmentsQueryOptions(trialId, patientId).queryKey, view);
    return queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey });
  };
}
