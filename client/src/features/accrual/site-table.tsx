import { useMemo } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../components/data-table';
import { day } from '../../lib/format';
import type { SiteRow } from './get-accrual';
import { GLYPHS } from '../../../../server/words';

const column = createColumnHelper<SiteRow>();
const figure = (value: number | null) => <span className="tabular-nums">{value ?? '—'}</span>;

/** Per-site accrual: enrolled, evaluable, pending outcomes and days since the last enrolment. */
export function SiteTable({ sites, warningWeeks }: { sites: SiteRow[]; warningWeeks: number }) {
  const columns = useMemo(
    () => [
      column.accessor('code', {
        header: 'Site',
        cell: ({ row: { original: s } }) => (
          <span>
            <span className="font-mono font-semibold">{s.code}</span>
            <span className="block text-xs text-ink-500">{s.name}</span>
          </span>
        ),
      }),
      column.accessor('plannedPerMonth', { header: 'Plan / month', cell: (c) => figure(c.getValue()) }),
      column.accessor('enrolled', { header: 'Enrolled', cell: (c) => figure(c.getValue()) }),
      column.accessor('evaluable', { header: 'Evaluable', cell: (c) => figure(c.getValue()) }),
      column.accessor('pendingOutcomes', { header: 'Outcomes pending', cell: (c) => figure(c.getValue()) }),
      column.accessor('lastEnrolledOn', { header: 'Last enrolment', cell: (c) => day(c.getValue()) }),
      column.accessor((s) => s.daysSinceLastEnrolment ?? Number.MAX_SAFE_INTEGER, {
        id: 'idle',
        header: 'Days since',
        cell: ({ row: { original: s } }) =>
          s.inactive ? (
            <span className="font-semibold text-alert-600">
              <span aria-hidden>{GLYPHS.warning} </span>
              {s.daysSinceLastEnrolment ?? 'never'} <span className="font-normal">(idle ≥ {warningWeeks} weeks)</span>
            </span>
          ) : (
            figure(s.daysSinceLastEnrolment)
          ),
      }),
    ],
    [warningWeeks],
  );
  return <DataTable data={sites} columns={columns} label="Accrual by site" filterLabel="Filter sites" pageSize={15} empty="No sites yet." initialSorting={[{ id: 'code', desc: false }]} />;
}
