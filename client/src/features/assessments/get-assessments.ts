import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { assessmentKeys } from './query-keys';
import type { AssessmentsView } from './types';

export const assessmentsPath = (trialId: string, patientId: string) => `/api/trials/${trialId}/patients/${patientId}/assessments`;

export const assessmentsQueryOptions = (trialId: string, patientId: string) =>
  queryOptions({
    queryKey: assessmentKeys.patient(trialId, patientId),
    queryFn: () => api<AssessmentsView>(assessmentsPath(trialId, patientId)),
  });

export const useAssessments = (trialId: string, patientId: string) => useQuery(assessmentsQueryOptions(trialId, patientId));
