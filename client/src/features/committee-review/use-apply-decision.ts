import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { DecisionInput } from '../../../../server/data-cuts/data-cuts.schema';
import { dataCutKeys, type AppliedDecision } from '../data-cuts';
import { wholeTrialKeys } from '../trials';

export function useApplyDecision(cutId: string, trialId: string) {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: (input: DecisionInput) => api<{ decision: AppliedDecision }>(`/api/data-cuts/${cutId}/decision`, { method: 'POST', body: input }),
    // The cut lists the decision; the cohort's status moves with it, which every page of the trial shows.
    onSuccess: () => invalidate(dataCutKeys.detail(cutId), ...wholeTrialKeys(trialId)),
  });
}
