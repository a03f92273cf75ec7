/**
 * Other features react to patient writes inside the same transaction (e.g. re-deriving the best
 * overall response from timepoint assessments). They register a hook once at start-up; every
 * enrolment, outcome change and import row calls the hooks before the transaction commits.
 */
import type { Knex } from 'knex';

export type PatientWrite = {
  trialId: string;
  cohortId: string;
  patientId: string;
  action: 'enrolled' | 'outcome_recorded' | 'outcome_corrected' | 'outcome_attested';
  actorUserId: string;
};

export type PatientWriteHook = (trx: Knex.Transaction, write: PatientWrite) => Promise<void>;

const hooks: PatientWriteHook[] = [];

export function registerPatientWriteHook(hook: PatientWriteHook): void {
  if (!hooks.includes(hook)) hooks.push(hook);
}

export async function runPatientWriteHooks(trx: Knex.Transaction, write: PatientWrite): Promise<void> {
  for (const hook of hooks) await hook(trx, write);
}
