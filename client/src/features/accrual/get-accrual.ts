import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { TrialAccrual } from '../../../../server/accrual/accrual.service';

export type { CohortAccrual, SiteRow, TargetProjection } from '../../../../server/accrual/accrual.service';
export type { SeriesPoint } from '../../../../server/accrual/timeline';

export const accrualQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: ['trials', trialId, 'accrual'],
    queryFn: async () => (await api<{ accrual: TrialAccrual }>(`/api/trials/${trialId}/accrual`)).accrual,
  });

export const useAccrual = (trialId: string) => useQuery(accrualQueryOptions(trialId));
