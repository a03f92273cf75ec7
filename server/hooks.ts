/**
 * What a write in one feature sets off in another, inside the same transaction: a patient write
 * re-derives the patient's best overall response from their assessments; a change to the
 * protocol's outcome rules re-derives every patient of the trial; a newly signed design version
 * applies its safety rule to the data already there. The features that emit an event
 * do not know who listens: the composition root (server/app.ts) names every listener and hands the
 * hooks to the routes, which pass them to the services. Nothing registers itself on import.
 */
import type { Knex } from 'knex';
import type { Patient } from './patients/index.js';

/** One write of one or more patients of a trial (an import's new patients are one write). */
export type PatientWrite = {
  trialId: string;
  patientIds: readonly string[];
  action: 'enrolled' | 'outcome_recorded' | 'outcome_corrected' | 'outcome_attested';
  actorUserId: string;
  /**
   * The written patients as the writer's update left them, locked in this transaction, when the
   * writer holds them (listeners read them otherwise). Their outcome, evaluability, attestation and
   * flag are current; their stage may not be, since the accrual rule can restage the cohort after
   * the update (the re-derivation does not read it).
   */
  written?: readonly Patient[];
};

export type ProtocolSettingsChange = { trialId: string; actorUserId: string };

export type DesignSigned = { trialId: string; cohortId: string; version: number; actorUserId: string };

export type Listener<E> = (trx: Knex.Transaction, event: E) => Promise<void>;

export type Hooks = {
  /** After every enrolment, outcome change and attestation (the form, the CSV import), before commit. */
  patientWritten: readonly Listener<PatientWrite>[];
  /** After the statistician changes the protocol's outcome settings, before commit. */
  protocolSettingsChanged: readonly Listener<ProtocolSettingsChange>[];
  /** After a design version is signed (lock, revision, amendment), before commit. */
  designSigned: readonly Listener<DesignSigned>[];
};

/** Runs the listeners one after another inside the caller's transaction. */
export async function emit<E>(trx: Knex.Transaction, listeners: readonly Listener<E>[], event: E): Promise<void> {
  for (const listener of listeners) await listener(trx, event);
}
