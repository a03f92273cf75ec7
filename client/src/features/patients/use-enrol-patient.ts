import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { EnrolInput } from '../../../../server/patients/patients.schema';
import { patientFigureKeys, patientKeys } from './query-keys';
import type { Patient } from './types';
import { useAfterPatientWrite } from './use-after-patient-write';

export type EnrolResult = { patient: Patient; accrual: { paused: boolean; continuesAtRisk: boolean } };

export function useEnrolPatient(trialId: string) {
  const after = useAfterPatientWrite(trialId);
  return useMutation({
    mutationFn: (input: EnrolInput) => api<EnrolResult>(`/api/trials/${trialId}/patients`, { method: 'POST', body: input }),
    // A new patient joins the lists and the counts.
    onSuccess: ({ accrual }) => after([patientKeys.lists(trialId), ...patientFigureKeys(trialId)], accrual.paused || accrual.continuesAtRisk),
  });
}
