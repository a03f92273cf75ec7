import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { assessmentsPath } from './get-assessments';
import { useAfterAssessmentWrite } from './use-after-assessment-write';
import type { Assessment, AssessmentsView, TimepointResponse } from './types';

export type CorrectionInput = { id: string; date?: string; response?: TimepointResponse; notes?: string | null; version: number; reason: string };

export function useCorrectAssessment(trialId: string, patientId: string) {
  const onSuccess = useAfterAssessmentWrite(trialId, patientId);
  return useMutation({
    mutationFn: ({ id, ...input }: CorrectionInput) =>
      api<AssessmentsView & { assessment: Assessment }>(`${assessmentsPath(trialId, patientId)}/${id}`, { method: 'PATCH', body: input }),
    onSuccess,
  });
}
