/**
 * The patients table: sorting and paging happen on the server (the list can be thousands of
 * patients), column choice is kept in this browser. Headers are buttons so the keyboard sorts.
 */
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type VisibilityState } from '@tanstack/react-table';
import { Button, EmptyState } from '../../components/ui';
import { day } from '../../lib/format';
import type { ListedPatient, PatientFilters } from './types';
import { OutcomeTag } from './words';
import { GLYPHS } from '../../../../server/words';

const column = createColumnHelper<ListedPatient>();

const columns = [
  column.accessor('studyId', {
    header: 'Study ID',
    cell: (c) => (
      <Link to={c.row.original.id} className="font-mono font-semibold text-ink-900 underline-offset-2 hover:underline">
        {c.getValue()}
      </Link>
    ),
  }),
  column.accessor('siteCode', { header: 'Site', cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
  column.accessor('cohortCode', { header: 'Cohort', cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
  column.accessor('stage', { header: 'Stage', cell: (c) => <span className="tabular-nums">{c.getValue()}</span> }),
  column.accessor('enrolledOn', { header: 'Enrolled', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
  column.accessor('outcome', { header: 'Outcome', cell: (c) => <OutcomeTag outcome={c.getValue()} /> }),
  column.accessor('bestOverallResponse', { header: 'Best response', cell: (c) => <span className="font-mono">{c.getValue() ?? '—'}</span> }),
  column.accessor('responseAssessedOn', { header: 'Assessed', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
  column.accessor('evaluable', {
    header: 'Evaluable',
    enableSorting: false,
    cell: (c) => (c.getValue() ? 'Yes' : <span title={c.row.original.notEvaluableReason ?? undefined}>No</span>),
  }),
  column.accessor((p) => p.attested, {
    id: 'attested',
    header: 'Attested',
    enableSorting: false,
    cell: (c) => (c.getValue() ? <span><span aria-hidden>{GLYPHS.done} </span>Signed</span> : <span className="text-ink-400">Not yet</span>),
  }),
  column.accessor('outcomeFlag', {
    header: 'Flag',
    enableSorting: false,
    cell: (c) => (c.getValue() ? <span title={c.getValue() ?? undefined}><span aria-hidden>{GLYPHS.disagrees} </span>Check</span> : ''),
  }),
];

const COLUMN_LABELS: Record<string, string> = {
  studyId: 'Study ID',
  siteCode: 'Site',
  cohortCode: 'Cohort',
  stage: 'Stage',
  enrolledOn: 'Enrolled',
  outcome: 'Outcome',
  bestOverallResponse: 'Best response',
  responseAssessedOn: 'Assessed',
  evaluable: 'Evaluable',
  attested: 'Attested',
  outcomeFlag: 'Flag',
};

const VISIBILITY_KEY = 'orrery.patients.columns';

function readVisibility(): VisibilityState {
  try {
    return JSON.parse(localStorage.getItem(VISIBILITY_KEY) ?? '{}') as VisibilityState;
  } catch {
    return {};
  }
}

export function PatientsTable({
  patients,
  total,
  filters,
  onChange,
  multiCohort,
}: {
  patients: ListedPatient[];
  total: number;
  filters: PatientFilters;
  onChange: (next: Partial<PatientFilters>) => void;
  multiCohort: boolean;
}) {
  const [visibility, setVisibility] = useState<VisibilityState>(() => ({ cohortCode: multiCohort, ...readVisibility() }));
  const table = useReactTable({
    data: patients,
    columns,
    state: { columnVisibility: visibility, sorting: [{ id: filters.sort, desc: filters.dir === 'desc' }] },
    onColumnVisibilityChange: (updater) =>
      setVisibility((old) => {
        const next = typeof updater === 'function' ? updater(old) : updater;
        localStorage.setItem(VISIBILITY_KEY, JSON.stringify(next));
        return next;
      }),
    manualSorting: true,
    manualPagination: true,
    getCoreRowModel: getCoreRowModel(),
  });
  const pages = Math.max(1, Math.ceil(total / filters.pageSize));
  const sortBy = (id: string) => onChange({ sort: id, dir: filters.sort === id && filters.dir === 'asc' ? 'desc' : 'asc', page: 1 });

  return (
    <div className="grid gap-2">
      <details className="text-sm">
        <summary className="cursor-pointer text-xs font-semibold tracking-wide text-ink-700 uppercase">Columns</summary>
        <fieldset className="mt-2 flex flex-wrap gap-x-4 gap-y-1">
          <legend className="sr-only">Columns to show</legend>
          {table.getAllLeafColumns().map((col) => (
            <label key={col.id} className="inline-flex items-center gap-1">
              <input type="checkbox" checked={col.getIsVisible()} onChange={col.getToggleVisibilityHandler()} disabled={col.id === 'studyId'} className="accent-ink-900" />
              {COLUMN_LABELS[col.id] ?? col.id}
            </label>
          ))}
        </fieldset>
      </details>
      <div className="overflow-x-auto">
        <table aria-label="Patients" className="w-full text-sm">
          <thead>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="border-b border-ink-200 text-left text-xs tracking-wide text-ink-500 uppercase">
                {group.headers.map((header) => {
                  const active = filters.sort === header.column.id;
                  const title = flexRender(header.column.columnDef.header, header.getContext());
                  return (
                    <th key={header.id} className="py-2 pr-4 font-semibold" aria-sort={active ? (filters.dir === 'asc' ? 'ascending' : 'descending') : undefined}>
                      {header.column.getCanSort() ? (
                        <button type="button" onClick={() => sortBy(header.column.id)} className="inline-flex items-center gap-1 uppercase">
                          {title}
                          <span aria-hidden className="text-ink-300">
                            {active ? (filters.dir === 'asc' ? GLYPHS.sortAscending : GLYPHS.sortDescending) : GLYPHS.sortable}
                          </span>
                        </button>
                      ) : (
                        title
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-b border-ink-100 align-top last:border-0">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="py-1.5 pr-4">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        {patients.length === 0 && <EmptyState>No patients match these filters.</EmptyState>}
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-xs text-ink-500">
        <span className="tabular-nums">
          {total} {total === 1 ? 'patient' : 'patients'} · page {Math.min(filters.page, pages)} of {pages}
        </span>
        <div className="flex items-center gap-2">
          <label htmlFor="patients-page-size">Rows per page</label>
          <select
            id="patients-page-size"
            value={filters.pageSize}
            onChange={(e) => onChange({ pageSize: Number(e.target.value), page: 1 })}
            className="rounded-sm border border-ink-300 bg-white px-1 py-0.5"
          >
            {[25, 50, 100, 200].map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
          <Button variant="secondary" disabled={filters.page <= 1} onClick={() => onChange({ page: filters.page - 1 })}>
            Previous
          </Button>
          <Button variant="secondary" disabled={filters.page >= pages} onClick={() => onChange({ page: filters.page + 1 })}>
            Next
          </Button>
        </div>
      </div>
    </div>
  );
}
