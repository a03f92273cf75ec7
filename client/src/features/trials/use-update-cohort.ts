import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { CohortUpdateInput } from '../../../../server/trials/trials.schema';
import type { Cohort } from './get-trial';
import { wholeTrialKeys } from './query-keys';

export function useUpdateCohort(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async ({ cohortId, ...input }: CohortUpdateInput & { cohortId: string }) =>
      (await api<{ cohort: Cohort }>(`/api/trials/${trialId}/cohorts/${cohortId}`, { method: 'PATCH', body: input })).cohort,
    onSettled: () => invalidate(...wholeTrialKeys(trialId)),
  });
}
