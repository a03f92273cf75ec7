import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Role } from '../../lib/roles';

export type Cohort = {
  id: string;
  code: string;
  name: string;
  position: number;
  status: string;
  stopCategory: string | null;
  stopReason: string | null;
  statusChangedAt: string;
  version: number;
};

export type Trial = {
  id: string;
  code: string;
  title: string;
  indication: string;
  endpointDefinition: string;
  plannedAccrualPerMonth: number | null;
  startDate: string | null;
  sponsorName: string | null;
  version: number;
  cohorts: Cohort[];
  status: string;
  myRoles: Role[];
  mySiteIds: string[];
};

export const trialQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: ['trials', trialId],
    queryFn: async () => (await api<{ trial: Trial }>(`/api/trials/${trialId}`)).trial,
  });

export const useTrial = (trialId: string) => useQuery(trialQueryOptions(trialId));
