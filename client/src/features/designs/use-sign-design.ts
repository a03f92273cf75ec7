import { useMutation } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { useInvalidate } from '../../lib/invalidate';
import { authKeys } from '../auth';
import { wholeTrialKeys } from '../trials';
import type { DesignVersion } from './types';

export type SignDesignBody = Record<string, unknown>;

/** Locks (or revises) a cohort's design, or signs an amendment after the first enrolment. */
export function useSignDesign(trialId: string, cohortId: string, route: 'lock' | 'amendment') {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: async (body: SignDesignBody) => {
      const path = `/api/trials/${trialId}/cohorts/${cohortId}/design${route === 'amendment' ? '/amendments' : ''}`;
      return (await api<{ design: DesignVersion }>(path, { method: 'POST', body })).design;
    },
    // The design frames the trial: the evaluation, accrual targets, patients' stages and the Portfolio all follow it; the signature used the session's password entry.
    onSuccess: () => void invalidate(...wholeTrialKeys(trialId), authKeys.me()),
  });
}
