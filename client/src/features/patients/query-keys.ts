import { accrualKeys } from '../accrual';
import { portfolioKeys } from '../portfolio';
import { overviewKeys } from '../trial-overview';
import { safetyKeys } from '../safety';
import { trialKeys } from '../trials';
import type { PatientFilters } from './types';

/** The patients' query keys. A patient's history sits under its record, so a change to the record refreshes both. */
export const patientKeys = {
  all: (trialId: string) => [...trialKeys.scope(trialId), 'patients'] as const,
  lists: (trialId: string) => [...patientKeys.all(trialId), 'list'] as const,
  list: (trialId: string, filters: PatientFilters) => [...patientKeys.lists(trialId), filters] as const,
  detail: (trialId: string, patientId: string) => [...patientKeys.all(trialId), 'detail', patientId] as const,
  history: (trialId: string, patientId: string) => [...patientKeys.detail(trialId, patientId), 'history'] as const,
};

/** The figures counted over a trial's patients, stale after any change to enrolment or outcomes (an enrolment adds to the safety counts too). */
export const patientFigureKeys = (trialId: string) => [overviewKeys.evaluation(trialId), accrualKeys.all(trialId), portfolioKeys.all(), safetyKeys.state(trialId)];
