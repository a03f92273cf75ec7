/**
 * The trials store: trials with their protocol settings, their cohorts and the sites taking part,
 * as plain domain objects. The only module that reads or writes the trials, cohorts and
 * trial_sites tables.
 */
import type { Knex } from 'knex';
import { preparedStatement, readPrepared, type Db, type FirstRead } from '../db/knex.js';
import type { Role } from '../auth/access.js';
import type { CohortStatus } from './trials.schema.js';

type Conn = Db | Knex.Transaction;

export type { CohortStatus };

export type Cohort = {
  id: string;
  code: string;
  name: string;
  position: number;
  status: CohortStatus;
  stopCategory: string | null;
  stopReason: string | null;
  statusChangedAt: string;
  version: number;
  /** Set while accrual is paused because the cohort's safety rule was crossed (the reason carries no figures). */
  safetyPause: SafetyPause | null;
};

export type SafetyPause = { since: string; reason: string };

export type Trial = {
  id: string;
  code: string;
  title: string;
  indication: string;
  endpointDefinition: string;
  plannedAccrualPerMonth: number | null;
  startDate: string | null;
  sponsorName: string | null;
  version: number;
  cohorts: Cohort[];
  /** The trial's status as people speak of it: its only cohort's, or a summary over cohorts. */
  status: CohortStatus | 'mixed';
};

type TrialRow = {
  id: string;
  code: string;
  title: string;
  indication: string;
  endpoint_definition: string;
  planned_accrual_per_month: number | null;
  start_date: string | null;
  sponsor_name: string | null;
  version: number;
};

export type CohortRow = {
  id: string;
  trial_id: string;
  code: string;
  name: string;
  position: number;
  status: CohortStatus;
  stop_category: string | null;
  stop_reason: string | null;
  status_changed_at: Date;
  version: number;
  safety_paused_at: Date | null;
  safety_pause_reason: string | null;
  safety_pause_toxicities: number | null;
  safety_reviewed_toxicities: number | null;
};

export function toCohort(row: CohortRow): Cohort {
  return {
    id: row.id,
    code: row.code,
    name: row.name,
    position: row.position,
    status: row.status,
    stopCategory: row.stop_category,
    stopReason: row.stop_reason,
    statusChangedAt: row.status_changed_at.toISOString(),
    version: row.version,
    safetyPause: row.safety_paused_at ? { since: row.safety_paused_at.toISOString(), reason: row.safety_pause_reason ?? '' } : null,
  };
}

export function trialStatus(cohorts: Cohort[]): Trial['status'] {
  const statuses = [...new Set(cohorts.map((c) => c.status))];
  if (statuses.length === 1) return statuses[0];
  return statuses.length === 0 ? 'draft' : 'mixed';
}

function toTrial(row: TrialRow, cohorts: Cohort[]): Trial {
  return {
    id: row.id,
    code: row.code,
    title: row.title,
    indication: row.indication,
    endpointDefinition: row.endpoint_definition,
    plannedAccrualPerMonth: row.planned_accrual_per_month,
    startDate: row.start_date,
    sponsorName: row.sponsor_name,
    version: row.version,
    cohorts,
    status: trialStatus(cohorts),
  };
}

async function cohortsByTrial(db: Conn, trialIds: string[]): Promise<Map<string, Cohort[]>> {
  const rows: CohortRow[] = trialIds.length ? await db('cohorts').whereIn('trial_id', trialIds).orderBy(['trial_id', 'position']) : [];
  const byTrial = new Map<string, Cohort[]>();
  for (const row of rows) byTrial.set(row.trial_id, [...(byTrial.get(row.trial_id) ?? []), toCohort(row)]);
  return byTrial;
}

export async function findTrial(db: Db, trialId: string): Promise<Trial | undefined> {
  const row: TrialRow | undefined = await db('trials').where({ id: trialId }).first();
  if (!row) return undefined;
  return toTrial(row, (await cohortsByTrial(db, [row.id])).get(row.id) ?? []);
}

/** A trial of the user's, with their roles on it and its data version (server/db/trial-versions.ts) as read with the roles. */
export type TrialForUser = Trial & { myRoles: Role[]; dataVersion: number };

const rolesAndVersionsRows = preparedStatement('orrery_roles_and_versions', (db, userId: string) =>
  db('memberships as m').leftJoin('trial_data_versions as v', 'v.trial_id', 'm.trial_id').where({ 'm.user_id': userId, 'm.status': 'active' }).select('m.trial_id', 'm.role', 'v.version'),
);

/** The user's active roles by trial, each with the trial's data version, in one narrow statement (read on every Portfolio). */
export async function rolesAndVersions(
  db: Db,
  userId: string,
  read: FirstRead = (statement) => readPrepared(db, statement),
): Promise<Map<string, { roles: Role[]; dataVersion: number }>> {
  const rows = await read<{ trial_id: string; role: Role; version: string | null }>(rolesAndVersionsRows(db, userId));
  const byTrial = new Map<string, { roles: Role[]; dataVersion: number }>();
  for (const row of rows) {
    const entry = byTrial.get(row.trial_id) ?? { roles: [], dataVersion: Number(row.version ?? 0) };
    if (!entry.roles.includes(row.role)) entry.roles.push(row.role);
    byTrial.set(row.trial_id, entry);
  }
  for (const entry of byTrial.values()) entry.roles.sort();
  return byTrial;
}

/** The trials with these ids and their cohorts (two statements). */
export async function trialsWithCohorts(db: Conn, trialIds: readonly string[]): Promise<Trial[]> {
  if (trialIds.length === 0) return [];
  const rows: TrialRow[] = await db('trials').whereIn('id', [...trialIds]);
  const cohorts = await cohortsByTrial(
    db,
    rows.map((r) => r.id),
  );
  return rows.map((row) => toTrial(row, cohorts.get(row.id) ?? []));
}

/** A site taking part in a trial, with the accrual planned there. */
export type TrialSite = { id: string; code: string; name: string; country: string; plannedAccrualPerMonth: number | null };

/** The protocol's rules for outcomes (RECIST 1.1 confirmation, stable-disease duration …). */
export type ProtocolSettings = {
  outcomeSource: 'entered' | 'derived';
  confirmationRequired: boolean;
  confirmationMinDays: number;
  sdMinDays: number;
  neBetweenResponses: 'ignore' | 'breaks_confirmation';
  assessmentIntervalDays: number;
  inactivityWarningWeeks: number;
};

/** The trial as its set-up forms need it: the record, its sites and its protocol settings. */
export type TrialDetail = Trial & { sites: TrialSite[]; protocolSettings: ProtocolSettings };

type SettingsRow = {
  outcome_source: ProtocolSettings['outcomeSource'];
  confirmation_required: boolean;
  confirmation_min_days: number;
  sd_min_days: number;
  ne_between_responses: ProtocolSettings['neBetweenResponses'];
  assessment_interval_days: number;
  inactivity_warning_weeks: number;
};

const toSettings = (row: SettingsRow): ProtocolSettings => ({
  outcomeSource: row.outcome_source,
  confirmationRequired: row.confirmation_required,
  confirmationMinDays: row.confirmation_min_days,
  sdMinDays: row.sd_min_days,
  neBetweenResponses: row.ne_between_responses,
  assessmentIntervalDays: row.assessment_interval_days,
  inactivityWarningWeeks: row.inactivity_warning_weeks,
});

const SETTINGS_COLUMNS: Array<keyof SettingsRow> = [
  'outcome_source',
  'confirmation_required',
  'confirmation_min_days',
  'sd_min_days',
  'ne_between_responses',
  'assessment_interval_days',
  'inactivity_warning_weeks',
];

const fromSettings = (settings: ProtocolSettings): SettingsRow => ({
  outcome_source: settings.outcomeSource,
  confirmation_required: settings.confirmationRequired,
  confirmation_min_days: settings.confirmationMinDays,
  sd_min_days: settings.sdMinDays,
  ne_between_responses: settings.neBetweenResponses,
  assessment_interval_days: settings.assessmentIntervalDays,
  inactivity_warning_weeks: settings.inactivityWarningWeeks,
});

/** The protocol's rules for outcomes and accrual warnings, or undefined when there is no such trial. */
export async function findProtocolSettings(db: Db, trialId: string): Promise<ProtocolSettings | undefined> {
  const row: SettingsRow | undefined = await db('trials').where({ id: trialId }).first(SETTINGS_COLUMNS);
  return row && toSettings(row);
}

export async function listTrialSites(db: Db, trialId: string): Promise<TrialSite[]> {
  return db('trial_sites as ts')
    .join('sites as s', 's.id', 'ts.site_id')
    .where('ts.trial_id', trialId)
    .orderBy('s.code')
    .select('s.id', 's.code', 's.name', 's.country', 'ts.planned_accrual_per_month as plannedAccrualPerMonth');
}

/** Reads the trial for a change; inside a transaction the row stays locked until commit. */
export async function findTrialDetail(db: Db, trialId: string, options: { lock?: boolean } = {}): Promise<TrialDetail | undefined> {
  const query = db('trials').where({ id: trialId }).first();
  const row: (TrialRow & SettingsRow) | undefined = await (options.lock ? query.forUpdate() : query);
  if (!row) return undefined;
  const cohorts = (await cohortsByTrial(db, [row.id])).get(row.id) ?? [];
  return { ...toTrial(row, cohorts), sites: await listTrialSites(db, trialId), protocolSettings: toSettings(row) };
}

export type TrialFields = {
  code: string;
  title: string;
  indication: string;
  endpointDefinition: string;
  sponsorName: string | null;
  plannedAccrualPerMonth: number | null;
  startDate: string | null;
};

const trialColumns = (fields: TrialFields) => ({
  code: fields.code,
  title: fields.title,
  indication: fields.indication,
  endpoint_definition: fields.endpointDefinition,
  sponsor_name: fields.sponsorName,
  planned_accrual_per_month: fields.plannedAccrualPerMonth,
  start_date: fields.startDate,
});

const isUniqueViolation = (error: unknown) => (error as { code?: string })?.code === '23505';

/** Inserts a trial; undefined when the code is already taken. */
export async function insertTrial(db: Db, fields: TrialFields, createdBy: string): Promise<string | undefined> {
  try {
    const [row] = await db('trials').insert({ ...trialColumns(fields), created_by: createdBy }).returning('id');
    return row.id;
  } catch (error) {
    if (isUniqueViolation(error)) return undefined;
    throw error;
  }
}

/** Updates the trial and bumps its version; false when the code is already taken. */
export async function updateTrialRow(db: Db, trialId: string, fields: TrialFields): Promise<boolean> {
  try {
    await db('trials')
      .where({ id: trialId })
      .update({ ...trialColumns(fields), version: db.raw('version + 1'), updated_at: db.fn.now() });
    return true;
  } catch (error) {
    if (isUniqueViolation(error)) return false;
    throw error;
  }
}

export async function updateProtocolSettingsRow(db: Db, trialId: string, settings: ProtocolSettings): Promise<void> {
  await db('trials')
    .where({ id: trialId })
    .update({ ...fromSettings(settings), version: db.raw('version + 1'), updated_at: db.fn.now() });
}

export async function insertCohorts(db: Db, trialId: string, cohorts: Array<{ code: string; name: string; position: number }>): Promise<Cohort[]> {
  const rows: CohortRow[] = await db('cohorts')
    .insert(cohorts.map((c) => ({ trial_id: trialId, code: c.code, name: c.name, position: c.position })))
    .returning('*');
  return rows.map(toCohort);
}

export async function findCohort(db: Db, trialId: string, cohortId: string, options: { lock?: boolean } = {}): Promise<Cohort | undefined> {
  const query = db('cohorts').where({ id: cohortId, trial_id: trialId }).first();
  const row: CohortRow | undefined = await (options.lock ? query.forUpdate() : query);
  return row && toCohort(row);
}

export async function updateCohortRow(db: Db, cohortId: string, fields: { code: string; name: string }): Promise<Cohort> {
  const [row]: CohortRow[] = await db('cohorts')
    .where({ id: cohortId })
    .update({ code: fields.code, name: fields.name, version: db.raw('version + 1') })
    .returning('*');
  return toCohort(row);
}

/** Sites that exist among the given ids. */
export async function existingSiteIds(db: Db, siteIds: string[]): Promise<Set<string>> {
  if (siteIds.length === 0) return new Set();
  const rows: Array<{ id: string }> = await db('sites').whereIn('id', siteIds).select('id');
  return new Set(rows.map((r) => r.id));
}

/** Which of the given sites still have patients or site-role members on the trial. */
export async function sitesInUse(db: Db, trialId: string, siteIds: string[]): Promise<Array<{ code: string; patients: number; members: number }>> {
  if (siteIds.length === 0) return [];
  const rows: Array<{ code: string; patients: number; members: number }> = await db('sites as s')
    .whereIn('s.id', siteIds)
    .select(
      's.code',
      db.raw('(select count(*) from patients p where p.trial_id = ? and p.site_id = s.id)::int as patients', [trialId]),
      db.raw('(select count(*) from memberships m where m.trial_id = ? and m.site_id = s.id)::int as members', [trialId]),
    );
  return rows.filter((r) => r.patients > 0 || r.members > 0);
}

export async function setTrialSites(db: Db, trialId: string, sites: Array<{ siteId: string; plannedAccrualPerMonth: number | null }>): Promise<void> {
  const keep = sites.map((s) => s.siteId);
  await db('trial_sites')
    .where({ trial_id: trialId })
    .modify((q) => {
      if (keep.length > 0) q.whereNotIn('site_id', keep);
    })
    .delete();
  if (sites.length === 0) return;
  await db('trial_sites')
    .insert(sites.map((s) => ({ trial_id: trialId, site_id: s.siteId, planned_accrual_per_month: s.plannedAccrualPerMonth })))
    .onConflict(['trial_id', 'site_id'])
    .merge(['planned_accrual_per_month']);
}


/** The trial's code alone, for writes that only name the trial. */
export async function trialCode(db: Db, trialId: string): Promise<string | undefined> {
  const trial = await db('trials').where({ id: trialId }).first('code');
  return trial?.code;
}

/** The trial's code and title, for mail that names it. */
export async function findTrialHeading(db: Db, trialId: string): Promise<{ code: string; title: string } | undefined> {
  return db('trials').where({ id: trialId }).first('code', 'title');
}

export type TrialHeading = { id: string; code: string; title: string; indication: string; sponsorName: string | null };

/** The trial row, locked until the transaction ends (so two data cuts of one trial are numbered in turn). */
export async function lockTrialHeading(trx: Knex.Transaction, trialId: string): Promise<TrialHeading | undefined> {
  const row = await trx('trials').where({ id: trialId }).forUpdate().first('id', 'code', 'title', 'indication', 'sponsor_name');
  return row && { id: row.id, code: row.code, title: row.title, indication: row.indication, sponsorName: row.sponsor_name };
}

/** The cohorts of a trial in their order. */
export async function listCohorts(db: Db, trialId: string): Promise<Cohort[]> {
  return (await cohortsByTrial(db, [trialId])).get(trialId) ?? [];
}

/** A site or cohort as enrolment and the patient list name it. */
export type SiteRef = { id: string; code: string; name: string };
export type CohortRef = { id: string; code: string; name: string; status: CohortStatus; position: number };
/** What enrolment checks against: the trial's start, its sites and its cohorts. */
export type TrialFacts = { id: string; code: string; startDate: string | null; sites: SiteRef[]; cohorts: CohortRef[] };

export async function trialFacts(db: Db, trialId: string): Promise<TrialFacts | undefined> {
  const trial = await db('trials').where({ id: trialId }).first('id', 'code', 'start_date');
  if (!trial) return undefined;
  const sites: SiteRef[] = await db('trial_sites as ts').join('sites as s', 's.id', 'ts.site_id').where('ts.trial_id', trialId).orderBy('s.code').select('s.id', 's.code', 's.name');
  const cohorts: CohortRef[] = await db('cohorts').where({ trial_id: trialId }).orderBy('position').select('id', 'code', 'name', 'status', 'position');
  return { id: trial.id, code: trial.code, startDate: trial.start_date, sites, cohorts };
}

/** Locks the cohort row until the transaction ends: enrolments into it are numbered one at a time, and its status moves one change at a time. */
export async function lockCohort(trx: Knex.Transaction, cohortId: string): Promise<(Cohort & { trialId: string }) | undefined> {
  const row: CohortRow | undefined = await trx('cohorts').where({ id: cohortId }).forUpdate().first();
  return row && { ...toCohort(row), trialId: row.trial_id };
}

export async function setCohortStatus(
  trx: Knex.Transaction,
  cohortId: string,
  change: { status: CohortStatus; stopCategory: string | null; stopReason: string | null; endSafetyPause?: boolean },
): Promise<void> {
  await trx('cohorts')
    .where({ id: cohortId })
    .update({
      status: change.status,
      stop_category: change.stopCategory,
      stop_reason: change.stopReason,
      status_changed_at: trx.fn.now(),
      version: trx.raw('version + 1'),
      ...(change.endSafetyPause ? { safety_paused_at: null, safety_pause_reason: null, safety_pause_toxicities: null } : {}),
    });
}

/** Starts a safety pause of the cohort's accrual (the status stays: the pause sits beside it). */
export async function setSafetyPause(trx: Knex.Transaction, cohortId: string, pause: { reason: string; toxicities: number }): Promise<void> {
  await trx('cohorts')
    .where({ id: cohortId })
    .update({ safety_paused_at: trx.fn.now(), safety_pause_reason: pause.reason, safety_pause_toxicities: pause.toxicities, version: trx.raw('version + 1') });
}

/**
 * The toxicity counts behind a cohort's safety pauses — safety figures, so they stay out of the
 * cohort record everyone reads: the count that started the current pause, and the count the
 * committee reviewed when accrual last resumed.
 */
export async function findSafetyReview(db: Db, cohortId: string): Promise<{ pauseToxicities: number | null; reviewedToxicities: number | null } | undefined> {
  const row = await db('cohorts').where({ id: cohortId }).first('safety_pause_toxicities', 'safety_reviewed_toxicities');
  return row && { pauseToxicities: row.safety_pause_toxicities, reviewedToxicities: row.safety_reviewed_toxicities };
}

/** Ends a safety pause, remembering how many toxicities the committee reviewed. */
export async function clearSafetyPause(trx: Knex.Transaction, cohortId: string, reviewedToxicities: number): Promise<void> {
  await trx('cohorts')
    .where({ id: cohortId })
    .update({ safety_paused_at: null, safety_pause_reason: null, safety_pause_toxicities: null, safety_reviewed_toxicities: reviewedToxicities, version: trx.raw('version + 1') });
}
