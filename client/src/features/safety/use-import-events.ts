import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useAfterEventWrite } from './use-after-event-write';
import type { EventImportReport } from './types';

export function useImportEvents(trialId: string) {
  const after = useAfterEventWrite(trialId);
  return useMutation({
    mutationFn: ({ file, dryRun }: { file: File; dryRun: boolean }) => {
      const formData = new FormData();
      formData.append('file', file);
      return api<EventImportReport>(`/api/trials/${trialId}/adverse-events/import${dryRun ? '?dryRun=1' : ''}`, { method: 'POST', formData });
    },
    onSuccess: (report) => (report.committed ? after(report.pausedCohorts.length > 0) : undefined),
  });
}
