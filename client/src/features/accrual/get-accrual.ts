import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';

export type SeriesPoint = { period: string; start: string; end: string; enrolled: number; cumulative: number; planned: number | null };

export type SiteAccrual = {
  siteId: string;
  code: string;
  name: string;
  plannedPerMonth: number | null;
  enrolled: number;
  evaluable: number;
  pendingOutcomes: number;
  lastEnrolledOn: string | null;
  daysSinceLastEnrolment: number | null;
  inactive: boolean;
  monthly: Array<{ period: string; cumulative: number; planned: number | null }>;
};

export type TargetProjection = {
  target: 'n1' | 'n';
  size: number;
  counted: number;
  remaining: number;
  reached: boolean;
  expected: string | null;
  earliest: string | null;
  latest: string | null;
  ratePerMonth: number | null;
  slowestMonth: { month: string; enrolled: number } | null;
  fastestMonth: { month: string; enrolled: number } | null;
  note: string;
};

export type CohortAccrual = {
  cohortId: string;
  code: string;
  name: string;
  status: string;
  design: { selection: string; n1: number | null; n: number; analysisPopulation: string } | null;
  enrolled: number;
  counted: number;
  evaluable: number;
  pendingOutcomes: number;
  enrolledLastWeek: number;
  lastEnrolledOn: string | null;
  projections: {
    window: { from: string; to: string; days: number; enrolled: number } | null;
    months: Array<{ month: string; enrolled: number }>;
    targets: TargetProjection[];
    notes: string[];
  };
};

export type InactivityWarning = { siteId: string; siteCode: string; siteName: string; weeks: number; lastEnrolledOn: string | null; text: string };

export type Accrual = {
  trialId: string;
  trialCode: string;
  asOf: string;
  plan: { perMonth: number | null; startDate: string | null };
  inactivityWarningWeeks: number;
  sitesShown: 'all' | 'own';
  totals: { enrolled: number; evaluable: number; pendingOutcomes: number; lastEnrolledOn: string | null; daysSinceLastEnrolment: number | null };
  timeline: { monthly: SeriesPoint[]; weekly: SeriesPoint[] };
  sites: SiteAccrual[];
  cohorts: CohortAccrual[];
  warnings: InactivityWarning[];
};

export const accrualQueryOptions = (trialId: string) =>
  queryOptions({
    queryKey: ['trials', trialId, 'accrual'],
    queryFn: async () => (await api<{ accrual: Accrual }>(`/api/trials/${trialId}/accrual`)).accrual,
  });

export const useAccrual = (trialId: string) => useQuery(accrualQueryOptions(trialId));
