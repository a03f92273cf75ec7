import { trialKeys } from '../trials';
import type { PriorQuery } from './types';

/**
 * The data cuts' query keys: a trial's list of cuts sits with the trial; a cut, reached by its own
 * id, keeps its record and its analyses (one per prior tried) apart, so a new prior leaves the
 * rest alone.
 */
export const dataCutKeys = {
  list: (trialId: string) => [...trialKeys.scope(trialId), 'data-cuts'] as const,
  /** Everything cached about one cut. */
  cut: (cutId: string) => ['data-cuts', cutId] as const,
  detail: (cutId: string) => [...dataCutKeys.cut(cutId), 'detail'] as const,
  analyses: (cutId: string) => [...dataCutKeys.cut(cutId), 'analysis'] as const,
  analysis: (cutId: string, prior: PriorQuery) => [...dataCutKeys.analyses(cutId), prior] as const,
};
