/** The shapes the data-cut routes answer with, named once for the client (types only from the server). */
import type { CutAnalysis } from '../../../../server/data-cuts/data-cuts.service';
import type { AppliedDecision, DataCut, Recommendation } from '../../../../server/data-cuts/data-cuts.repository';

export type { CohortAnalysis, OpenIssue, Deviation, SiteRow } from '../../../../server/data-cuts/analysis';
export type { AppliedDecision, DataCut, Recommendation };
export type Analysis = CutAnalysis;

export type DataCutListItem = Omit<DataCut, 'snapshot'> & {
  recommendationCount: number;
  decisionCount: number;
  createdByName: string | null;
  cohorts: Array<{ id: string; code: string; name: string }>;
};

export type DataCutDetail = { dataCut: DataCut; recommendations: Recommendation[]; decisions: AppliedDecision[]; committeeSize: number };

export type PriorQuery = { a?: number; b?: number; thetaT?: number };
