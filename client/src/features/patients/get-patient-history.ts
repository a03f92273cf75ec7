import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { patientsKey } from './get-patients';
import type { HistoryEntry } from './types';

export const patientHistoryQueryOptions = (trialId: string, patientId: string) =>
  queryOptions({
    queryKey: [...patientsKey(trialId), patientId, 'history'],
    queryFn: async () => (await api<{ entries: HistoryEntry[] }>(`/api/trials/${trialId}/patients/${patientId}/history`)).entries,
  });

export const usePatientHistory = (trialId: string, patientId: string) => useQuery(patientHistoryQueryOptions(trialId, patientId));
