import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { CohortEvaluation, VisibleCohortEvaluation, VisibleEvaluation } from '../../../../server/evaluation/evaluation.service';
import { overviewKeys } from './query-keys';

/** A cohort's evaluation as this user may see it: live keys only where allowed, else `efficacyHidden`; released and own-site figures where given. */
export type { VisibleCohortEvaluation as CohortView };
/** A cohort's live evaluation with every live key present. */
export type LiveCohort = Omit<CohortEvaluation, 'sites'>;

export const evaluationQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: overviewKeys.evaluation(trialId),
    queryFn: () => api<VisibleEvaluation>(`/api/trials/${trialId}/evaluation`),
  });

export const useEvaluation = (trialId: string) => useQuery(evaluationQueryOptions(trialId));

/** The cohort with its live figures, when the server sent them (it leaves them out exactly when it says why). */
export const liveOf = (cohort: VisibleCohortEvaluation): LiveCohort | null => (cohort.efficacyHidden === undefined ? (cohort as LiveCohort) : null);
