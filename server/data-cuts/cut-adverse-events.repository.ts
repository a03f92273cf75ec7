/**
 * The frozen adverse events of a data cut: every event of the cut's patients as the cut saw it,
 * written once at the cut (append-only) and read back by patient and onset. The cut's safety
 * section, report and adverse-events dataset read a cut's events only from here.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Attribution, EventOutcome } from '../safety/index.js';

type Conn = Db | Knex.Transaction;

/** One adverse event as the cut saw it. */
export type CutAdverseEvent = {
  eventId: string;
  patientId: string;
  studyId: string;
  siteCode: string;
  cohortId: string;
  onsetOn: string;
  term: string;
  grade: number | null;
  attribution: Attribution | null;
  serious: boolean;
  outcome: EventOutcome;
  attested: boolean;
  attestationSignatureId: string | null;
  eventVersion: number;
};

type CutEventRow = {
  adverse_event_id: string;
  patient_id: string;
  study_id: string;
  site_code: string;
  cohort_id: string;
  onset_on: string;
  term: string;
  grade: number | null;
  attribution: Attribution | null;
  serious: boolean;
  outcome: EventOutcome;
  attested: boolean;
  attestation_signature_id: string | null;
  event_version: number;
};

/** The order a cut keeps its events in: by study ID, onset, then the event's id (so the hash is stable). */
export const byPatientThenOnset = (a: CutAdverseEvent, b: CutAdverseEvent) =>
  a.studyId !== b.studyId ? (a.studyId < b.studyId ? -1 : 1) : a.onsetOn !== b.onsetOn ? (a.onsetOn < b.onsetOn ? -1 : 1) : a.eventId < b.eventId ? -1 : a.eventId > b.eventId ? 1 : 0;

export async function insertCutAdverseEvents(trx: Knex.Transaction, cutId: string, events: CutAdverseEvent[]): Promise<void> {
  const copies = events.map((e) => ({
    data_cut_id: cutId,
    adverse_event_id: e.eventId,
    patient_id: e.patientId,
    study_id: e.studyId,
    site_code: e.siteCode,
    cohort_id: e.cohortId,
    onset_on: e.onsetOn,
    term: e.term,
    grade: e.grade,
    attribution: e.attribution,
    serious: e.serious,
    outcome: e.outcome,
    attested: e.attested,
    attestation_signature_id: e.attestationSignatureId,
    event_version: e.eventVersion,
  }));
  for (let i = 0; i < copies.length; i += 500) await trx('data_cut_adverse_events').insert(copies.slice(i, i + 500));
}

export async function readCutAdverseEvents(conn: Conn, cutId: string): Promise<CutAdverseEvent[]> {
  const rows: CutEventRow[] = await conn('data_cut_adverse_events').where({ data_cut_id: cutId });
  return rows
    .map((row) => ({
      eventId: row.adverse_event_id,
      patientId: row.patient_id,
      studyId: row.study_id,
      siteCode: row.site_code,
      cohortId: row.cohort_id,
      onsetOn: row.onset_on,
      term: row.term,
      grade: row.grade,
      attribution: row.attribution,
      serious: row.serious,
      outcome: row.outcome,
      attested: row.attested,
      attestationSignatureId: row.attestation_signature_id,
      eventVersion: row.event_version,
    }))
    .sort(byPatientThenOnset);
}
