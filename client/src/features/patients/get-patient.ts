import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { patientKeys } from './query-keys';
import type { Patient } from './types';

export const patientQueryOptions = (trialId: string, patientId: string) =>
  queryOptions({
    queryKey: patientKeys.detail(trialId, patientId),
    queryFn: async () => (await api<{ patient: Patient }>(`/api/trials/${trialId}/patients/${patientId}`)).patient,
  });

export const usePatient = (trialId: string, patientId: string) => useQuery(patientQueryOptions(trialId, patientId));
