import type { Feature } from '../../lib/feature';
import { PortfolioPage } from './portfolio-page';

export const portfolioFeature: Feature = {
  routes: [{ index: true, element: <PortfolioPage /> }],
  nav: [{ path: '/', label: 'Portfolio', order: 10 }],
};
