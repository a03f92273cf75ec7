/** What other features use of data cuts: a cut, its analysis and how they are shown, and their keys (the committee review builds on them). */
export { AnalysisView } from './analysis-view';
export { CutHeader, Downloads } from './cut-summary';
export { useDataCut } from './get-data-cut';
export { useAnalysis } from './get-analysis';
export { dataCutKeys } from './query-keys';
export type { AppliedDecision, DataCut, DataCutDetail, Recommendation } from './types';
