import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { OutcomeInput } from '../../../../server/patients/patients.schema';
import { assessmentKeys } from '../assessments';
import { patientFigureKeys, patientKeys } from './query-keys';
import type { Patient } from './types';
import { useAfterPatientWrite } from './use-after-patient-write';

export type OutcomeResult = { patient: Patient; changed: boolean; correction: boolean; attestationCleared: boolean; accrual: { paused: boolean; continuesAtRisk: boolean } };

export function useRecordOutcome(trialId: string, patientId: string) {
  const after = useAfterPatientWrite(trialId);
  return useMutation({
    mutationFn: (input: OutcomeInput) => api<OutcomeResult>(`/api/trials/${trialId}/patients/${patientId}`, { method: 'PATCH', body: input }),
    // The assessments panel and Needs attention compare the entered outcome with the derived one.
    onSuccess: ({ patient, accrual }) =>
      after(
        [
          patientKeys.detail(trialId, patient.id),
          patientKeys.lists(trialId),
          assessmentKeys.patient(trialId, patient.id),
          assessmentKeys.needsAttention(trialId),
          ...patientFigureKeys(trialId),
        ],
        accrual.paused || accrual.continuesAtRisk,
      ),
  });
}
