/** What the assessments endpoints return; the derivation's shape is the server's own type. */
import type { Derivation, TimepointResponse } from '../../../../server/assessments/derivation';

export type { AttentionItem, AttentionKind, Derivation, DerivationStep, TimepointResponse } from '../../../../server/assessments/derivation';

export type Assessment = {
  id: string;
  patientId: string;
  trialId: string;
  date: string;
  response: TimepointResponse;
  notes: string | null;
  version: number;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
};

export type AssessedPatientSummary = {
  id: string;
  studyId: string;
  siteId: string;
  enrolledOn: string;
  outcome: 'pending' | 'responder' | 'non_responder';
  bestOverallResponse: TimepointResponse | null;
  evaluable: boolean;
  outcomeFlag: string | null;
  derivedBestOverallResponse: TimepointResponse | null;
  derivedResponder: boolean | null;
  version: number;
};

export type AssessmentsView = {
  patient: AssessedPatientSummary;
  outcomeSource: 'entered' | 'derived';
  settings: Derivation['settings'];
  assessments: Assessment[];
  derivation: Derivation;
};
