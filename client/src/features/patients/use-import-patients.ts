/**
 * Uploads a CSV for a dry run or a commit. XMLHttpRequest rather than fetch, because only it
 * reports upload progress; once the file is sent, the server's processing is shown as a phase.
 */
import { useMutation } from '@tanstack/react-query';
import { useState } from 'react';
import { ApiError } from '../../lib/api';
import { assessmentKeys } from '../assessments';
import { patientFigureKeys, patientKeys } from './query-keys';
import type { ImportReport } from './types';
import { useAfterPatientWrite } from './use-after-patient-write';

export type ImportProgress = { phase: 'idle' | 'uploading' | 'processing'; fraction: number };

function send(url: string, file: File, onProgress: (p: ImportProgress) => void): Promise<ImportReport> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (event) => onProgress({ phase: 'uploading', fraction: event.lengthComputable ? event.loaded / event.total : 0 });
    xhr.upload.onload = () => onProgress({ phase: 'processing', fraction: 1 });
    xhr.onerror = () => reject(new ApiError(0, 'network', 'The server could not be reached. Check your connection and try again.'));
    xhr.onload = () => {
      let payload: { error?: { code?: string; message?: string; fields?: Record<string, string> } & Record<string, unknown> } | undefined;
      try {
        payload = JSON.parse(xhr.responseText);
      } catch {
        payload = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(payload as unknown as ImportReport);
      const { code, message, fields, ...details } = payload?.error ?? {};
      reject(new ApiError(xhr.status, code ?? 'http_error', message ?? `Import failed (${xhr.status}).`, fields ?? {}, details));
    };
    const form = new FormData();
    form.append('file', file);
    xhr.send(form);
  });
}

export function useImportPatients(trialId: string) {
  const after = useAfterPatientWrite(trialId);
  const [progress, setProgress] = useState<ImportProgress>({ phase: 'idle', fraction: 0 });
  const mutation = useMutation({
    mutationFn: ({ file, dryRun }: { file: File; dryRun: boolean }) =>
      send(`/api/trials/${trialId}/patients/import${dryRun ? '?dryRun=1' : ''}`, file, setProgress).finally(() => setProgress({ phase: 'idle', fraction: 0 })),
    onSuccess: (report) =>
      report.committed
        ? after(
            [patientKeys.all(trialId), assessmentKeys.all(trialId), assessmentKeys.needsAttention(trialId), ...patientFigureKeys(trialId)],
            report.pausedCohorts.length > 0,
          )
        : undefined,
  });
  return { ...mutation, progress };
}
