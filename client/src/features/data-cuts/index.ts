/** What other features use of data cuts: a cut, its analysis and how they are shown (the committee review builds on them). */
export { AnalysisView } from './analysis-view';
export { CutHeader, Downloads } from './cut-summary';
export { dataCutQueryOptions, useDataCut } from './get-data-cut';
export { useAnalysis } from './get-analysis';
export type { AppliedDecision, DataCutDetail, Recommendation } from './types';
