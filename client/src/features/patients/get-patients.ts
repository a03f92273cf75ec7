import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { patientKeys } from './query-keys';
import type { PatientFilters, PatientList } from './types';

export function patientsQueryString(filters: PatientFilters): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(filters)) if (value !== undefined && value !== '') params.set(key, String(value));
  return params.toString();
}

export const patientsQueryOptions = (trialId: string, filters: PatientFilters) =>
  queryOptions({
    queryKey: patientKeys.list(trialId, filters),
    queryFn: ({ signal }) => api<PatientList>(`/api/trials/${trialId}/patients?${patientsQueryString(filters)}`, { signal }),
    placeholderData: keepPreviousData,
  });

export const usePatients = (trialId: string, filters: PatientFilters) => useQuery(patientsQueryOptions(trialId, filters));
