import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';
import type { PortfolioFilter } from '../../../../server/portfolio/portfolio.schema';
import type { Portfolio } from '../../../../server/portfolio/portfolio.service';
import { portfolioKeys } from './query-keys';

export type { PortfolioRow, Progress } from '../../../../server/portfolio/portfolio.service';

const search = (filter: PortfolioFilter) => {
  const params = new URLSearchParams();
  if (filter.status) params.set('status', filter.status);
  if (filter.indication) params.set('indication', filter.indication);
  const query = params.toString();
  return query ? `?${query}` : '';
};

export const portfolioQueryOptions = (filter: PortfolioFilter = {}) =>
  queryOptions({
    queryKey: portfolioKeys.rows(filter),
    queryFn: async () => (await api<{ portfolio: Portfolio }>(`/api/portfolio${search(filter)}`)).portfolio,
    placeholderData: keepPreviousData,
  });

export const usePortfolio = (filter: PortfolioFilter) => useQuery(portfolioQueryOptions(filter));
