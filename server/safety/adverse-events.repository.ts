/**
 * The adverse events store: a patient's adverse events, the only module that reads or writes the
 * adverse_events table. Reads return camelCase domain objects through one mapper, with the
 * patient's study ID, site, cohort and enrolment and the attestation's signer joined in; the
 * trial-wide list filters, sorts and pages in SQL.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Attribution, EventListQuery, EventOutcome } from './safety.schema.js';

type Conn = Db | Knex.Transaction;

export type EventAttestation = { signatureId: string; signerEmail: string; signerName: string | null; signedAt: string };

export type AdverseEvent = {
  id: string;
  trialId: string;
  patientId: string;
  studyId: string;
  siteId: string;
  siteCode: string;
  cohortId: string;
  cohortCode: string;
  enrolledOn: string;
  onsetOn: string;
  term: string;
  grade: number | null;
  attribution: Attribution | null;
  serious: boolean;
  outcome: EventOutcome;
  notes: string | null;
  attested: EventAttestation | null;
  version: number;
  createdAt: string;
  updatedAt: string;
};

type EventRow = {
  id: string;
  trial_id: string;
  patient_id: string;
  study_id: string;
  site_id: string;
  site_code: string;
  cohort_id: string;
  cohort_code: string;
  enrolled_on: string;
  onset_on: string;
  term: string;
  grade: number | null;
  attribution: Attribution | null;
  serious: boolean;
  outcome: EventOutcome;
  notes: string | null;
  attestation_signature_id: string | null;
  signer_email: string | null;
  signer_name: string | null;
  signed_at: Date | null;
  version: number;
  created_at: Date;
  updated_at: Date;
};

function toEvent(row: EventRow): AdverseEvent {
  return {
    id: row.id,
    trialId: row.trial_id,
    patientId: row.patient_id,
    studyId: row.study_id,
    siteId: row.site_id,
    siteCode: row.site_code,
    cohortId: row.cohort_id,
    cohortCode: row.cohort_code,
    enrolledOn: row.enrolled_on,
    onsetOn: row.onset_on,
    term: row.term,
    grade: row.grade,
    attribution: row.attribution,
    serious: row.serious,
    outcome: row.outcome,
    notes: row.notes,
    attested:
      row.attestation_signature_id && row.signed_at
        ? { signatureId: row.attestation_signature_id, signerEmail: row.signer_email ?? '', signerName: row.signer_name, signedAt: row.signed_at.toISOString() }
        : null,
    version: row.version,
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  };
}

const COLUMNS = [
  'e.id',
  'e.trial_id',
  'e.patient_id',
  'p.study_id',
  'p.site_id',
  's.code as site_code',
  'p.cohort_id',
  'c.code as cohort_code',
  'p.enrolled_on',
  'e.onset_on',
  'e.term',
  'e.grade',
  'e.attribution',
  'e.serious',
  'e.outcome',
  'e.notes',
  'e.attestation_signature_id',
  'sig.signer_email',
  'su.name as signer_name',
  'sig.signed_at',
  'e.version',
  'e.created_at',
  'e.updated_at',
];

function baseQuery(db: Conn) {
  return db('adverse_events as e')
    .join('patients as p', 'p.id', 'e.patient_id')
    .join('sites as s', 's.id', 'p.site_id')
    .join('cohorts as c', 'c.id', 'p.cohort_id')
    .leftJoin('signatures as sig', 'sig.id', 'e.attestation_signature_id')
    .leftJoin('users as su', 'su.id', 'sig.signer_user_id');
}

/** A patient's events, earliest onset first. */
export async function listEventsOfPatient(db: Conn, patientId: string): Promise<AdverseEvent[]> {
  const rows: EventRow[] = await baseQuery(db).where('e.patient_id', patientId).orderBy(['e.onset_on', 'e.created_at']).select(COLUMNS);
  return rows.map(toEvent);
}

/** Every event of the cohorts' patients (a data cut copies them), by patient and onset. */
export async function listEventsOfCohorts(db: Conn, cohortIds: string[]): Promise<AdverseEvent[]> {
  if (cohortIds.length === 0) return [];
  const rows: EventRow[] = await baseQuery(db).whereIn('p.cohort_id', cohortIds).orderBy(['p.study_id', 'e.onset_on', 'e.id']).select(COLUMNS);
  return rows.map(toEvent);
}

export async function findEvent(db: Conn, patientId: string, eventId: string, options: { forUpdate?: boolean } = {}): Promise<AdverseEvent | undefined> {
  const query = baseQuery(db).where({ 'e.id': eventId, 'e.patient_id': patientId }).first(COLUMNS);
  if (options.forUpdate) query.forUpdate('e');
  const row: EventRow | undefined = await query;
  return row && toEvent(row);
}

/** The event the import matches a row to: same patient, onset and term (letter case aside). */
export async function findEventByKey(db: Conn, patientId: string, onsetOn: string, term: string): Promise<AdverseEvent | undefined> {
  const row: EventRow | undefined = await baseQuery(db)
    .where({ 'e.patient_id': patientId, 'e.onset_on': onsetOn })
    .whereRaw('lower(e.term) = lower(?)', [term])
    .orderBy('e.created_at')
    .first(COLUMNS);
  return row && toEvent(row);
}

export const EVENT_FIELDS = ['onsetOn', 'term', 'grade', 'attribution', 'serious', 'outcome', 'notes'] as const;

/** What a site writes of an event: the event's own fields, nothing derived. */
export type EventFields = Pick<AdverseEvent, (typeof EVENT_FIELDS)[number]>;

export async function insertEvent(trx: Knex.Transaction, input: EventFields & { trialId: string; patientId: string; createdBy: string }): Promise<string> {
  const [row] = await trx('adverse_events')
    .insert({
      trial_id: input.trialId,
      patient_id: input.patientId,
      onset_on: input.onsetOn,
      term: input.term,
      grade: input.grade,
      attribution: input.attribution,
      serious: input.serious,
      outcome: input.outcome,
      notes: input.notes,
      created_by: input.createdBy,
    })
    .returning('id');
  return row.id as string;
}

/** Writes the changes only if the version still matches; false when someone else wrote first. */
export async function updateEvent(trx: Knex.Transaction, id: string, version: number, fields: EventFields, options: { clearAttestation: boolean }): Promise<boolean> {
  const updated = await trx('adverse_events')
    .where({ id, version })
    .update({
      onset_on: fields.onsetOn,
      term: fields.term,
      grade: fields.grade,
      attribution: fields.attribution,
      serious: fields.serious,
      outcome: fields.outcome,
      notes: fields.notes,
      ...(options.clearAttestation ? { attestation_signature_id: null } : {}),
      version: version + 1,
      updated_at: trx.fn.now(),
    });
  return updated === 1;
}

export async function deleteEvent(trx: Knex.Transaction, id: string, version: number): Promise<boolean> {
  return (await trx('adverse_events').where({ id, version }).delete()) === 1;
}

export async function setEventAttestation(trx: Knex.Transaction, id: string, version: number, signatureId: string): Promise<boolean> {
  const updated = await trx('adverse_events').where({ id, version }).update({ attestation_signature_id: signatureId, version: version + 1, updated_at: trx.fn.now() });
  return updated === 1;
}

const SORT_SQL: Record<EventListQuery['sort'], string[]> = {
  onsetOn: ['e.onset_on'],
  studyId: ["split_part(p.study_id, '-', 1)", "split_part(p.study_id, '-', 2)::int"],
  siteCode: ['s.code'],
  grade: ['e.grade'],
  attribution: ["array_position(array['unrelated','unlikely','possible','probable','definite'], e.attribution)"],
  serious: ['e.serious'],
};

/** One page of the trial's events at the sites in scope ('all' for roles that read every site), with the total. */
export async function listEvents(db: Db, trialId: string, scope: string[] | 'all', query: EventListQuery): Promise<{ events: AdverseEvent[]; total: number }> {
  const filtered = () => {
    const q = baseQuery(db).where('e.trial_id', trialId);
    if (scope !== 'all') q.whereIn('p.site_id', scope);
    if (query.cohortId) q.where('p.cohort_id', query.cohortId);
    if (query.siteId) q.where('p.site_id', query.siteId);
    if (query.minGrade) q.where('e.grade', '>=', query.minGrade);
    if (query.serious !== undefined) q.where('e.serious', query.serious);
    if (query.q) {
      const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      q.where((w) => {
        w.whereILike('p.study_id', like).orWhereILike('e.term', like);
      });
    }
    return q;
  };
  const [{ total }] = await filtered().clearSelect().count({ total: '*' });
  const page = filtered().select(COLUMNS);
  const direction = query.dir === 'asc' ? 'asc' : 'desc';
  for (const expression of SORT_SQL[query.sort]) page.orderByRaw(`${expression} ${direction} nulls last`);
  page.orderBy('e.id');
  const rows: EventRow[] = await page.limit(query.pageSize).offset((query.page - 1) * query.pageSize);
  return { events: rows.map(toEvent), total: Number(total) };
}
