import { dataCutKeys } from '../data-cuts';

/** The committee review's query key: the recommendations signed on a cut, kept with the cut. */
export const reviewKeys = {
  recommendations: (cutId: string) => [...dataCutKeys.cut(cutId), 'recommendations'] as const,
};
