/** The committee's signed recommendations on data cuts: one per member per cut, with the signature and the analysis version it signed. */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { toSignature, type Signature } from '../signatures/signatures.js';
import type { RecommendationDecision } from './data-cuts.schema.js';

type Conn = Db | Knex.Transaction;

export type Recommendation = {
  id: string;
  dataCutId: string;
  memberUserId: string;
  memberName: string | null;
  memberEmail: string;
  decision: RecommendationDecision;
  rationale: string;
  /** The analysis version (prior) the member saw and signed. */
  analysisVersion: number;
  signature: Signature;
  createdAt: string;
};

export async function listRecommendations(conn: Conn, cutId: string): Promise<Recommendation[]> {
  const rows = await conn('recommendations as r')
    .join('signatures as s', 's.id', 'r.signature_id')
    .join('users as u', 'u.id', 'r.member_user_id')
    .join('analysis_versions as av', 'av.id', 'r.analysis_version_id')
    .where({ 'r.data_cut_id': cutId })
    .orderBy('r.created_at')
    .select(
      'r.*',
      'u.name as member_name',
      'u.email as member_email',
      'av.version as analysis_version',
      conn.raw(`to_jsonb(s.*) as signature`),
    );
  return rows.map((row) => ({
    id: row.id,
    dataCutId: row.data_cut_id,
    memberUserId: row.member_user_id,
    memberName: row.member_name,
    memberEmail: row.member_email,
    decision: row.decision,
    rationale: row.rationale,
    analysisVersion: row.analysis_version,
    signature: toSignature(row.signature),
    createdAt: (row.created_at as Date).toISOString(),
  }));
}

export async function findRecommendationBy(conn: Conn, cutId: string, userId: string): Promise<{ id: string } | undefined> {
  return conn('recommendations').where({ data_cut_id: cutId, member_user_id: userId }).first('id');
}

export async function insertRecommendation(
  trx: Knex.Transaction,
  input: { dataCutId: string; memberUserId: string; decision: RecommendationDecision; rationale: string; signatureId: string; analysisVersionId: string },
): Promise<string> {
  const [row] = await trx('recommendations')
    .insert({
      data_cut_id: input.dataCutId,
      member_user_id: input.memberUserId,
      decision: input.decision,
      rationale: input.rationale,
      signature_id: input.signatureId,
      analysis_version_id: input.analysisVersionId,
    })
    .returning('id');
  return row.id;
}
