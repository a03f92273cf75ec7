import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { AssessmentImportReport, AssessmentRowResult } from '../../../../server/assessments/assessments-import';
import { patientFigureKeys, patientKeys } from '../patients';
import { assessmentKeys } from './query-keys';

export type { AssessmentRowResult as ImportRow, AssessmentImportReport as ImportReport };

export function useImportAssessments(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ file, dryRun }: { file: File; dryRun: boolean }) => {
      const formData = new FormData();
      formData.append('file', file);
      return api<AssessmentImportReport>(`/api/trials/${trialId}/assessments/import${dryRun ? '?dryRun=1' : ''}`, { method: 'POST', formData });
    },
    // Any patient's assessments, and so its outcome and flags, may have changed.
    onSuccess: (report) =>
      report.committed
        ? invalidate(assessmentKeys.all(trialId), patientKeys.all(trialId), assessmentKeys.needsAttention(trialId), ...patientFigureKeys(trialId))
        : undefined,
  });
}
