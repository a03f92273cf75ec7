import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { CohortInput } from '../../../../server/trials/trials.schema';
import type { Cohort } from './get-trial';
import { wholeTrialKeys } from './query-keys';

export function useAddCohort(trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: CohortInput) =>
      (await api<{ cohort: Cohort }>(`/api/trials/${trialId}/cohorts`, { method: 'POST', body: input })).cohort,
    onSuccess: () => invalidate(...wholeTrialKeys(trialId)),
  });
}
