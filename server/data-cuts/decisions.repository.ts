/** The decisions applied to cohorts from data cuts: the move, the stop category, the reason and who applied it. */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { CohortStatus } from '../trials/index.js';
import type { DecisionAction } from './data-cuts.schema.js';

type Conn = Db | Knex.Transaction;

export type AppliedDecision = {
  id: string;
  dataCutId: string;
  cohortId: string;
  cohortCode: string;
  action: DecisionAction;
  fromStatus: CohortStatus;
  toStatus: CohortStatus;
  stopCategory: string | null;
  reason: string;
  appliedBy: string | null;
  appliedByName: string | null;
  appliedAt: string;
};

export async function listDecisions(conn: Conn, cutId: string): Promise<AppliedDecision[]> {
  const rows = await conn('data_cut_decisions as d')
    .join('cohorts as c', 'c.id', 'd.cohort_id')
    .leftJoin('users as u', 'u.id', 'd.applied_by')
    .where({ 'd.data_cut_id': cutId })
    .orderBy('d.applied_at')
    .select('d.*', 'c.code as cohort_code', 'u.name as applied_by_name');
  return rows.map((row) => ({
    id: row.id,
    dataCutId: row.data_cut_id,
    cohortId: row.cohort_id,
    cohortCode: row.cohort_code,
    action: row.action,
    fromStatus: row.from_status,
    toStatus: row.to_status,
    stopCategory: row.stop_category,
    reason: row.reason,
    appliedBy: row.applied_by,
    appliedByName: row.applied_by_name,
    appliedAt: (row.applied_at as Date).toISOString(),
  }));
}

export async function insertDecision(
  trx: Knex.Transaction,
  input: Omit<AppliedDecision, 'id' | 'cohortCode' | 'appliedByName' | 'appliedAt'> & { appliedAt?: Date },
): Promise<string> {
  const [row] = await trx('data_cut_decisions')
    .insert({
      data_cut_id: input.dataCutId,
      cohort_id: input.cohortId,
      action: input.action,
      from_status: input.fromStatus,
      to_status: input.toStatus,
      stop_category: input.stopCategory,
      reason: input.reason,
      applied_by: input.appliedBy,
      ...(input.appliedAt ? { applied_at: input.appliedAt } : {}),
    })
    .returning('id');
  return row.id;
}
