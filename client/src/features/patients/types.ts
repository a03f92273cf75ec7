/** The shapes the patients API answers with (types only: nothing of the server is bundled). */
export type { Patient, ListedPatient, Attestation, HistoryEntry, OutcomeCounts, TrialSite, TrialCohort } from '../../../../server/patients/patients.repository';
export type { ImportReport, RowResult, ImportCounts } from '../../../../server/patients/patients-import';
import type { ListedPatient, OutcomeCounts, TrialSite, TrialCohort } from '../../../../server/patients/patients.repository';

export type PatientList = {
  patients: ListedPatient[];
  total: number;
  page: number;
  pageSize: number;
  counts: OutcomeCounts;
  sites: TrialSite[];
  enrolSites: TrialSite[];
  cohorts: TrialCohort[];
};

export type PatientFilters = {
  siteId?: string;
  cohortId?: string;
  outcome?: string;
  status?: string;
  stage?: string;
  q?: string;
  sort: string;
  dir: 'asc' | 'desc';
  page: number;
  pageSize: number;
};
