import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { TrialAccrual } from '../../../../server/accrual/accrual.service';
import { accrualKeys } from './query-keys';

export type { CohortAccrual, SiteRow, TargetProjection } from '../../../../server/accrual/accrual.service';
export type { SeriesPoint } from '../../../../server/accrual/timeline';

export const accrualQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: accrualKeys.all(trialId),
    queryFn: async () => (await api<{ accrual: TrialAccrual }>(`/api/trials/${trialId}/accrual`)).accrual,
  });

export const useAccrual = (trialId: string) => useQuery(accrualQueryOptions(trialId));
