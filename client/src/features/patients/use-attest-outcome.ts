import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { authKeys } from '../auth';
import { patientKeys } from './query-keys';
import type { Patient } from './types';
import { useAfterPatientWrite } from './use-after-patient-write';

export function useAttestOutcome(trialId: string, patientId: string) {
  const after = useAfterPatientWrite(trialId);
  return useMutation({
    mutationFn: (version: number) => api<{ patient: Patient }>(`/api/trials/${trialId}/patients/${patientId}/attestation`, { method: 'POST', body: { version } }),
    // An attestation counts in no figure: only the patient and the lists show it; it used the session's password entry.
    onSuccess: () => after([patientKeys.detail(trialId, patientId), patientKeys.lists(trialId), authKeys.me()]),
  });
}
