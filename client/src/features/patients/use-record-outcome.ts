import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { OutcomeInput } from '../../../../server/patients/patients.schema';
import type { Patient } from './types';
import { useAfterPatientWrite } from './use-after-patient-write';

export type OutcomeResult = { patient: Patient; changed: boolean; correction: boolean; attestationCleared: boolean; accrual: { paused: boolean; continuesAtRisk: boolean } };

export function useRecordOutcome(trialId: string, patientId: string) {
  const after = useAfterPatientWrite(trialId);
  return useMutation({
    mutationFn: (input: OutcomeInput) => api<OutcomeResult>(`/api/trials/${trialId}/patients/${patientId}`, { method: 'PATCH', body: input }),
    onSuccess: after,
  });
}
