import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { patientKeys } from './query-keys';
import type { HistoryEntry } from './types';

export const patientHistoryQueryOptions = (trialId: string, patientId: string) =>
  queryOptions({
    queryKey: patientKeys.history(trialId, patientId),
    queryFn: async () => (await api<{ entries: HistoryEntry[] }>(`/api/trials/${trialId}/patients/${patientId}/history`)).entries,
  });

export const usePatientHistory = (trialId: string, patientId: string) => useQuery(patientHistoryQueryOptions(trialId, patientId));
