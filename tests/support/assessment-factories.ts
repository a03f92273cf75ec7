/** Builders for timepoint assessments and the protocol's outcome settings, written straight to the database. */
import { addDays, format } from 'date-fns';
import type { Db } from '../../server/db/knex.js';
import type { TimepointResponse } from '../../server/assessments/derivation.js';
import type { TrialFixture } from './factories.js';
import { enrolPatientsDirectly, type DirectPatient } from './patient-factories.js';

/** A date `days` from today ('YYYY-MM-DD'); negative for the past. */
export const daysFromToday = (days: number) => format(addDays(new Date(), days), 'yyyy-MM-dd');
export const shiftDate = (date: string, days: number) => format(addDays(new Date(`${date}T00:00:00`), days), 'yyyy-MM-dd');

export async function setOutcomeSettings(
  db: Db,
  trialId: string,
  settings: Partial<{
    outcomeSource: 'entered' | 'derived';
    confirmationRequired: boolean;
    confirmationMinDays: number;
    sdMinDays: number;
    neBetweenResponses: 'ignore' | 'breaks_confirmation';
    assessmentIntervalDays: number;
  }>,
): Promise<void> {
  const columns = {
    outcome_source: settings.outcomeSource,
    confirmation_required: settings.confirmationRequired,
    confirmation_min_days: settings.confirmationMinDays,
    sd_min_days: settings.sdMinDays,
    ne_between_responses: settings.neBetweenResponses,
    assessment_interval_days: settings.assessmentIntervalDays,
  };
  await db('trials')
    .where({ id: trialId })
    .update(Object.fromEntries(Object.entries(columns).filter(([, v]) => v !== undefined)));
}

/** One patient at a site of the fixture trial (the first site by default: the demo coordinator's). */
export async function enrolOne(db: Db, trial: TrialFixture, options: { site?: string } & DirectPatient = {}): Promise<{ id: string; studyId: string }> {
  const { site, ...patient } = options;
  const siteId = trial.siteIds[site ?? Object.keys(trial.siteIds)[0]];
  const [created] = await enrolPatientsDirectly(db, { trialId: trial.trialId, cohortId: trial.cohortIds[0], siteId, patients: [patient] });
  return created;
}

export async function addAssessmentsDirectly(
  db: Db,
  input: { trialId: string; patientId: string; assessments: Array<{ date: string; response: TimepointResponse; notes?: string }> },
): Promise<string[]> {
  if (input.assessments.length === 0) return [];
  const rows = await db('assessments')
    .insert(input.assessments.map((a) => ({ trial_id: input.trialId, patient_id: input.patientId, assessed_on: a.date, response: a.response, notes: a.notes ?? null })))
    .returning('id');
  return rows.map((r: { id: string }) => r.id);
}

const matrixPatients = new Map<string, Promise<string>>();
const matrixAssessments = new Map<string, Promise<string>>();

/** The one patient (at the coordinator's site) that every patient-level route of the matrix uses. */
export function matrixPatient(db: Db, trial: TrialFixture): Promise<string> {
  if (!matrixPatients.has(trial.trialId)) {
    matrixPatients.set(trial.trialId, enrolOne(db, trial, { enrolledOn: daysFromToday(-120) }).then((p) => p.id));
  }
  return matrixPatients.get(trial.trialId) as Promise<string>;
}

/** One assessment of the matrix patient, shared by the assessment routes. */
export function matrixAssessment(db: Db, trial: TrialFixture, patientId: string): Promise<string> {
  if (!matrixAssessments.has(patientId)) {
    matrixAssessments.set(
      patientId,
      addAssessmentsDirectly(db, { trialId: trial.trialId, patientId, assessments: [{ date: daysFromToday(-60), response: 'SD' }] }).then(([id]) => id),
    );
  }
  return matrixAssessments.get(patientId) as Promise<string>;
}
