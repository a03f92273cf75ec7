import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { trialQueryOptions } from '../trials';
import { designsQueryOptions } from './get-designs';
import type { DesignVersion } from './types';

export type SignDesignBody = Record<string, unknown>;

/** Locks (or revises) a cohort's design, or signs an amendment after the first enrolment. */
export function useSignDesign(trialId: string, cohortId: string, route: 'lock' | 'amendment') {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (body: SignDesignBody) => {
      const path = `/api/trials/${trialId}/cohorts/${cohortId}/design${route === 'amendment' ? '/amendments' : ''}`;
      return (await api<{ design: DesignVersion }>(path, { method: 'POST', body })).design;
    },
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: designsQueryOptions(trialId).queryKey });
      void queryClient.invalidateQueries({ queryKey: trialQueryOptions(trialId).queryKey, exact: true });
    },
  });
}
