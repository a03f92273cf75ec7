import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../components/data-table';
import { StatusTag } from '../../components/ui';
import { day, percent } from '../../lib/format';
import { GLYPHS } from '../../../../server/words';
import type { MilestoneKind } from '../../../../server/portfolio/milestone';
import { ProgressBar } from './progress-bar';
import type { PortfolioRow } from './get-portfolio';

const column = createColumnHelper<PortfolioRow>();

/** The next milestone's glyph: the status it leads to. */
const MILESTONE_GLYPHS: Record<MilestoneKind, string> = {
  'design-lock': GLYPHS.draft,
  'first-enrolment': GLYPHS.enrollingStage1,
  'stage-1-complete': GLYPHS.paused,
  'interim-analysis': GLYPHS.paused,
  'committee-review': GLYPHS.paused,
  'enrolment-complete': GLYPHS.finalAnalysis,
  'final-analysis': GLYPHS.finalAnalysis,
  none: '—',
};

function ResponseCell({ row }: { row: PortfolioRow }) {
  // The server leaves the live figures out exactly when it says why.
  if (row.efficacyHidden === undefined) {
    return (
      <span className="tabular-nums">
        {row.responders} / {row.outcomesKnown}
        <span className="block text-xs text-ink-500">{percent(row.responseRate)} naive, live</span>
      </span>
    );
  }
  if (row.released) {
    return (
      <span className="tabular-nums">
        <span aria-hidden>{GLYPHS.released} </span>
        {row.released.responders} / {row.released.outcomesKnown}
        <span className="block text-xs text-ink-500">
          {percent(row.released.responseRate)} naive, {row.released.label}
        </span>
      </span>
    );
  }
  return (
    <span className="text-xs text-ink-500" title={row.efficacyHidden}>
      <span aria-hidden>{GLYPHS.withheld} </span>
      Not released
      <span className="sr-only">: {row.efficacyHidden}</span>
    </span>
  );
}

/** The Portfolio's dense table: one row per cohort, sortable, filterable and paged. */
export function PortfolioTable({ rows }: { rows: PortfolioRow[] }) {
  const columns = useMemo(
    () => [
      column.accessor((r) => `${r.trialCode} ${r.cohortCode}`, {
        id: 'trial',
        header: 'Trial',
        cell: ({ row: { original: r } }) => (
          <div>
            <Link to={`/trials/${r.trialId}`} className="font-mono font-semibold text-ink-900 underline-offset-2 hover:underline">
              {r.trialCode}
            </Link>
            {r.cohortCount > 1 && <span className="ml-1 font-mono text-xs text-brass-700">{r.cohortCode}</span>}
            <div className="max-w-56 text-xs text-ink-500">{r.cohortCount > 1 ? r.cohortName : r.trialTitle}</div>
          </div>
        ),
      }),
      column.accessor('indication', { header: 'Indication' }),
      column.accessor('statusWords', {
        header: 'Status',
        cell: ({ row: { original: r } }) => (
          <div>
            <StatusTag status={r.status} />
            <div className="mt-0.5 text-xs text-ink-500">{r.stageWords}</div>
          </div>
        ),
      }),
      column.accessor((r) => r.progress.n?.fraction ?? -1, {
        id: 'enrolment',
        header: 'Enrolled against n1 and n',
        cell: ({ row: { original: r } }) => (
          <div className="grid gap-1">
            {r.design?.n1 !== null && <ProgressBar label="n1" progress={r.progress.n1} />}
            <ProgressBar label="n" progress={r.progress.n} />
            <span className="text-xs text-ink-500 tabular-nums">
              {r.enrolled} enrolled · {r.enrolledLastWeek} this week
            </span>
          </div>
        ),
      }),
      column.accessor((r) => r.nextMilestone.text, {
        id: 'milestone',
        header: 'Next milestone',
        cell: ({ row: { original: r } }) => (
          <span>
            <span aria-hidden className="text-brass-600">
              {MILESTONE_GLYPHS[r.nextMilestone.kind]}{' '}
            </span>
            {r.nextMilestone.text}
          </span>
        ),
      }),
      column.accessor((r) => r.responseRate ?? r.released?.responseRate ?? -1, { id: 'response', header: 'Responders / decided', cell: ({ row }) => <ResponseCell row={row.original} /> }),
      column.accessor((r) => r.lastRecommendation?.on ?? '', {
        id: 'recommendation',
        header: 'Last recommendation',
        cell: ({ row: { original: r } }) =>
          r.lastRecommendation === undefined ? (
            <span className="text-xs text-ink-400" title={r.efficacyHidden}>
              —<span className="sr-only">not shown for your role on this trial</span>
            </span>
          ) : r.lastRecommendation ? (
            <span>
              {r.lastRecommendation.words}
              <span className="block text-xs text-ink-500">{day(r.lastRecommendation.on)}</span>
            </span>
          ) : (
            <span className="text-xs text-ink-400">none yet</span>
          ),
      }),
    ],
    [],
  );
  return (
    <DataTable
      data={rows}
      columns={columns}
      label="Trials and cohorts"
      filterLabel="Search"
      pageSize={25}
      empty="No trial matches these filters."
      initialSorting={[{ id: 'trial', desc: false }]}
    />
  );
}
