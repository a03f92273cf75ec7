import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { assessmentsPath } from './get-assessments';
import { useAfterAssessmentWrite } from './use-after-assessment-write';
import type { AssessmentsView } from './types';

export function useRemoveAssessment(trialId: string, patientId: string) {
  const onSuccess = useAfterAssessmentWrite(trialId, patientId);
  return useMutation({
    mutationFn: ({ id, ...input }: { id: string; version: number; reason: string }) =>
      api<AssessmentsView>(`${assessmentsPath(trialId, patientId)}/${id}`, { method: 'DELETE', body: input }),
    onSuccess,
  });
}
