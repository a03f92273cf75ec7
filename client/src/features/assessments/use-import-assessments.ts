import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { trialQueryOptions } from '../trials';
import type { AssessmentImportReport, AssessmentRowResult } from '../../../../server/assessments/assessments-import';

export type { AssessmentRowResult as ImportRow, AssessmentImportReport as ImportReport };

export function useImportAssessments(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, dryRun }: { file: File; dryRun: boolean }) => {
      const formData = new FormData();
      formData.append('file', file);
      return api<AssessmentImportReport>(`/api/trials/${trialId}/assessments/import${dryRun ? '?dryRun=1' : ''}`, { method: 'POST', formData });
    },
    onSuccess: (report) => (report.committed ? queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey }) : undefined),
  });
}
