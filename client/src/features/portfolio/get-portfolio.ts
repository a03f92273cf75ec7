import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { Role } from '../../lib/roles';
import type { PortfolioFilter } from '../../../../server/portfolio/portfolio.schema';

export type Progress = { counted: number; target: number; fraction: number };
export type Milestone = { kind: string; text: string; patientsToGo?: number; outcomesPending?: number; since?: string };

export type PortfolioRow = {
  trialId: string;
  trialCode: string;
  trialTitle: string;
  indication: string;
  sponsorName: string | null;
  myRoles: Role[];
  view: 'full' | 'sponsor' | 'site';
  cohortId: string;
  cohortCode: string;
  cohortName: string;
  cohortCount: number;
  status: string;
  statusWords: string;
  stage: 1 | 2 | null;
  stageWords: string;
  design: { selection: string; n1: number | null; n: number; analysisPopulation: string } | null;
  enrolled: number;
  counted: number;
  evaluable: number;
  pendingOutcomes: number;
  enrolledLastWeek: number;
  sitesEnrolling: number;
  lastEnrolledOn: string | null;
  progress: { n1: Progress | null; n: Progress | null };
  nextMilestone: Milestone;
  lastRecommendation: { decision: string; words: string; on: string } | null;
  committeeReviewPendingSince: string | null;
  releasedToSponsorAt: string | null;
  responseFiguresHidden: boolean;
  responseFiguresHiddenReason?: string;
  /** Present only where the user may see response figures. */
  responders?: number;
  outcomesKnown?: number;
  responseRate?: number | null;
  stage1Responders?: number;
};

export type Portfolio = { asOf: string; rows: PortfolioRow[]; indications: string[] };

const search = (filter: PortfolioFilter) => {
  const params = new URLSearchParams();
  if (filter.status) params.set('status', filter.status);
  if (filter.indication) params.set('indication', filter.indication);
  const query = params.toString();
  return query ? `?${query}` : '';
};

export const portfolioQueryOptions = (filter: PortfolioFilter = {}) =>
  queryOptions({
    queryKey: ['portfolio', filter],
    queryFn: async () => (await api<{ portfolio: Portfolio }>(`/api/portfolio${search(filter)}`)).portfolio,
    placeholderData: keepPreviousData,
  });

export const usePortfolio = (filter: PortfolioFilter) => useQuery(portfolioQueryOptions(filter));
