import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import type { TrialCreateInput } from '../../../../server/trials/trials.schema';
import { authKeys } from '../auth';
import { portfolioKeys } from '../portfolio';
import type { TrialDetail } from './get-trial';

export function useCreateTrial() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (input: TrialCreateInput) => (await api<{ trial: TrialDetail }>('/api/trials', { method: 'POST', body: input })).trial,
    // The new trial joins the Portfolio, and its creator is now its admin: their roles changed.
    onSuccess: () => invalidate(portfolioKeys.all(), authKeys.me()),
  });
}
