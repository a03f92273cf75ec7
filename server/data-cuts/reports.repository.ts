/**
 * The reports store: each report version of a cut kept with its PDF bytes and SHA-256, append-only.
 * A report version covers one analysis version and the recommendations and decisions recorded by
 * then; once issued it is served as stored, never rebuilt.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';

type Conn = Db | Knex.Transaction;

/** What a report version covers (the key that tells whether the current state has one). */
export type ReportCoverage = { dataCutId: string; analysisVersionId: string; recommendationCount: number; decisionCount: number };

export type StoredReport = { id: string; seq: number; sha256: string; pdf: Buffer; createdAt: string };

type ReportRow = { id: string; seq: number; sha256: string; pdf: Buffer; created_at: Date };

const toReport = (row: ReportRow): StoredReport => ({ id: row.id, seq: row.seq, sha256: row.sha256, pdf: row.pdf, createdAt: row.created_at.toISOString() });

export async function findReport(conn: Conn, coverage: ReportCoverage): Promise<StoredReport | undefined> {
  const row: ReportRow | undefined = await conn('data_cut_reports')
    .where({
      data_cut_id: coverage.dataCutId,
      analysis_version_id: coverage.analysisVersionId,
      recommendation_count: coverage.recommendationCount,
      decision_count: coverage.decisionCount,
    })
    .first('id', 'seq', 'sha256', 'pdf', 'created_at');
  return row && toReport(row);
}

/** Stores the next report version of the cut; the caller holds the cut's row lock, so numbers never collide. */
export async function insertReport(
  trx: Knex.Transaction,
  input: ReportCoverage & { sha256: string; pdf: Buffer; createdBy: string },
): Promise<StoredReport> {
  const last = await trx('data_cut_reports').where({ data_cut_id: input.dataCutId }).max({ seq: 'seq' }).first();
  const [row] = await trx('data_cut_reports')
    .insert({
      data_cut_id: input.dataCutId,
      seq: Number(last?.seq ?? 0) + 1,
      analysis_version_id: input.analysisVersionId,
      recommendation_count: input.recommendationCount,
      decision_count: input.decisionCount,
      sha256: input.sha256,
      pdf: input.pdf,
      created_by: input.createdBy,
    })
    .returning(['id', 'seq', 'sha256', 'pdf', 'created_at']);
  return toReport(row as ReportRow);
}
