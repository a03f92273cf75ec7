import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { trialQueryOptions } from '../trial-overview/get-trial';

export type ImportRow = {
  line: number;
  studyId: string;
  date: string;
  result: 'new' | 'update' | 'unchanged' | 'error';
  errors: Array<{ column: string; reason: string }>;
};
export type ImportReport = {
  dryRun: boolean;
  committed: boolean;
  counts: { total: number; new: number; update: number; unchanged: number; error: number };
  rows: ImportRow[];
  derivationsChanged: number;
};

export function useImportAssessments(trialId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, dryRun }: { file: File; dryRun: boolean }) => {
      const formData = new FormData();
      formData.append('file', file);
      return api<ImportReport>(`/api/trials/${trialId}/assessments/import${dryRun ? '?dryRun=1' : ''}`, { method: 'POST', formData });
    },
    onSuccess: (report) => (report.committed ? queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey }) : undefined),
  });
}
