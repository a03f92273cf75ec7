/** Reads trials and their cohorts as plain domain objects. */
import type { Db } from '../db/knex.js';
import type { Role } from '../http/routes.js';

export type CohortStatus =
  | 'draft'
  | 'enrolling_stage_1'
  | 'interim_review'
  | 'enrolling_stage_2'
  | 'final_analysis'
  | 'completed'
  | 'stopped';

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
};

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

type CohortRow = {
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

async function cohortsByTrial(db: Db, trialIds: string[]): Promise<Map<string, Cohort[]>> {
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

export type TrialForUser = Trial & { myRoles: Role[] };

export async function listTrialsForUser(db: Db, userId: string): Promise<TrialForUser[]> {
  const rows: Array<TrialRow & { roles: Role[] }> = await db('trials as t')
    .join('memberships as m', 'm.trial_id', 't.id')
    .where({ 'm.user_id': userId, 'm.status': 'active' })
    .groupBy('t.id')
    .orderBy('t.code')
    .select('t.*', db.raw('array_agg(distinct m.role) as roles'));
  const cohorts = await cohortsByTrial(
    db,
    rows.map((r) => r.id),
  );
  return rows.map((row) => ({ ...toTrial(row, cohorts.get(row.id) ?? []), myRoles: row.roles }));
}
