/**
 * Filters of the Portfolio, shared by the route's validation and the client's filter controls.
 * Kept free of server-only imports: the client imports this file directly.
 */
import { object, string, type InferType } from 'yup';
import { COHORT_STATUSES } from '../trials/trials.schema.js';

export const portfolioFilterSchema = object({
  status: string().oneOf([...COHORT_STATUSES], 'Choose one of the listed statuses.').optional(),
  indication: string().trim().max(200, 'Keep the indication under 200 characters.').optional(),
});
export type PortfolioFilter = InferType<typeof portfolioFilterSchema>;
