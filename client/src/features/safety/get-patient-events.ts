import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { safetyKeys } from './query-keys';
import type { PatientEventsView } from './types';

export const patientEventsQueryOptions = (trialId: string, patientId: string) =>
  queryOptions({
    queryKey: safetyKeys.patientEvents(trialId, patientId),
    queryFn: () => api<PatientEventsView>(`/api/trials/${trialId}/patients/${patientId}/adverse-events`),
  });

export const usePatientEvents = (trialId: string, patientId: string) => useQuery(patientEventsQueryOptions(trialId, patientId));
