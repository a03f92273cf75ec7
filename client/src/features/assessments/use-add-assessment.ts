import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { assessmentsPath } from './get-assessments';
import { useAfterAssessmentWrite } from './use-after-assessment-write';
import type { Assessment, AssessmentsView, TimepointResponse } from './types';

export type AssessmentInput = { date: string; response: TimepointResponse | ''; notes?: string | null };

export function useAddAssessment(trialId: string, patientId: string) {
  const onSuccess = useAfterAssessmentWrite(trialId, patientId);
  return useMutation({
    mutationFn: (input: AssessmentInput) => api<AssessmentsView & { assessment: Assessment }>(assessmentsPath(trialId, patientId), { method: 'POST', body: input }),
    onSuccess,
  });
}
