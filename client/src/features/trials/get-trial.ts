import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Role } from '../../lib/roles';
import type { TrialDetail } from '../../../../server/trials/trials.repository';
import { trialKeys } from './query-keys';

export type { Cohort, ProtocolSettings, TrialDetail, TrialSite } from '../../../../server/trials/trials.repository';

/** The trial as GET /api/trials/:id answers it: the record plus the reader's own roles and sites. */
export type Trial = TrialDetail & {
  myRoles: Role[];
  mySiteIds: string[];
};

export const trialQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: trialKeys.detail(trialId),
    queryFn: async () => (await api<{ trial: Trial }>(`/api/trials/${trialId}`)).trial,
  });

export const useTrial = (trialId: string) => useQuery(trialQueryOptions(trialId));
