import { trialKeys } from '../trials';

/** Accrual's query key: enrolment over time, by cohort and site. */
export const accrualKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'accrual'] as const,
};
