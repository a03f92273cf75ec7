import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CohortEvaluation } from '../../../../server/evaluation/evaluation.service';
import { overviewKeys } from './query-keys';

export type { CohortEvaluation };
export type Evaluation = { trialId: string; confLevel: number; cautions: string[]; cohorts: CohortEvaluation[] };

export const evaluationQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: overviewKeys.evaluation(trialId),
    queryFn: () => api<Evaluation>(`/api/trials/${trialId}/evaluation`),
  });

export const useEvaluation = (trialId: string) => useQuery(evaluationQueryOptions(trialId));
