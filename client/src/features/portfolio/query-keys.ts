import type { PortfolioFilter } from '../../../../server/portfolio/portfolio.schema';

/** The Portfolio's query keys: its rows under each filter, and the sponsor digest built from them. */
export const portfolioKeys = {
  all: () => ['portfolio'] as const,
  rows: (filter: PortfolioFilter) => [...portfolioKeys.all(), 'rows', filter] as const,
  digestPreview: () => [...portfolioKeys.all(), 'digest-preview'] as const,
};
