/**
 * The released-figures store: a cohort's figures as a committee decision released them — the
 * cohort's part of its data cut's analysis, kept at the release, one row per (cut, cohort). Sponsors
 * and site staff read these instead of live counts (server/auth/visibility.ts), so recording an
 * outcome after the release never moves what they were shown.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { CohortAnalysis, CohortSafetyAnalysis, CutKind } from '../data-cuts/index.js';

type Conn = Db | Knex.Transaction;

/** The cohort-level part of a cut's analysis that a release makes visible (no sites, no patients, no path). */
export type ReleasedAnalysis = Pick<CohortAnalysis, 'responseRate' | 'exactTest' | 'rule' | 'inference' | 'bayes'> & {
  counts: NonNullable<CohortAnalysis['counts']>;
  /** The cohort's safety at the cut (releases made before safety monitoring have none). */
  safety?: ReleasedSafety;
};

/** The cohort-level part of a cut's safety section that a release makes visible (no study IDs, no event ids). */
export type ReleasedSafety = Pick<CohortSafetyAnalysis, 'safetyRule' | 'counts' | 'toxicityRate' | 'state' | 'joint' | 'sentences'>;

export type ReleasedFigures = ReleasedAnalysis & {
  cohortId: string;
  cutId: string;
  cutSeq: number;
  cutKind: CutKind;
  cutAt: string;
  releasedAt: string;
};

type ReleasedRow = {
  cohort_id: string;
  data_cut_id: string;
  cut_seq: number;
  cut_kind: CutKind;
  cut_at: Date;
  released_at: Date;
  figures: ReleasedAnalysis;
};

const toReleased = (row: ReleasedRow): ReleasedFigures => ({
  ...row.figures,
  cohortId: row.cohort_id,
  cutId: row.data_cut_id,
  cutSeq: row.cut_seq,
  cutKind: row.cut_kind,
  cutAt: row.cut_at.toISOString(),
  releasedAt: row.released_at.toISOString(),
});

export async function insertReleasedFigures(
  trx: Knex.Transaction,
  input: { cutId: string; cohortId: string; decisionId: string; cutSeq: number; cutKind: CutKind; cutAt: string; figures: ReleasedAnalysis },
): Promise<void> {
  await trx('released_figures').insert({
    data_cut_id: input.cutId,
    cohort_id: input.cohortId,
    decision_id: input.decisionId,
    cut_seq: input.cutSeq,
    cut_kind: input.cutKind,
    cut_at: new Date(input.cutAt),
    figures: JSON.stringify(input.figures),
  });
}

/** Each cohort's latest released figures (the most recent cut a decision released), one indexed read for all cohorts. */
export async function latestReleased(conn: Conn, cohortIds: string[]): Promise<Map<string, ReleasedFigures>> {
  if (cohortIds.length === 0) return new Map();
  const rows: ReleasedRow[] = await conn('released_figures')
    .distinctOn('cohort_id')
    .whereIn('cohort_id', cohortIds)
    .orderBy([{ column: 'cohort_id' }, { column: 'cut_at', order: 'desc' }, { column: 'released_at', order: 'desc' }])
    .select('cohort_id', 'data_cut_id', 'cut_seq', 'cut_kind', 'cut_at', 'released_at', 'figures');
  return new Map(rows.map((row) => [row.cohort_id, toReleased(row)]));
}
