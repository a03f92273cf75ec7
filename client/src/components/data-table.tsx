/**
 * The app's table: TanStack Table with sortable headers (buttons, so the keyboard reaches them),
 * a text filter and paging. Pages either locally or, with `server`, through the caller's paging.
 */
import { useState, type ReactNode } from 'react';
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from '@tanstack/react-table';
import { Button, EmptyState } from './ui';
import { GLYPHS } from '../../../server/words';

type ServerPaging = { total: number; pageIndex: number; pageSize: number; onPageChange: (pageIndex: number) => void };

export function DataTable<T>({
  data,
  columns,
  label,
  filterLabel,
  pageSize = 20,
  empty = 'Nothing to show.',
  server,
  initialSorting = [],
}: {
  data: T[];
  // TanStack's column value types differ per column; `any` is its documented way to mix them.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<T, any>[];
  /** Names the table for screen readers. */
  label: string;
  /** Shows a text filter over every column when given. */
  filterLabel?: string;
  pageSize?: number;
  empty?: ReactNode;
  server?: ServerPaging;
  initialSorting?: SortingState;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [filter, setFilter] = useState('');
  const [pagination, setPagination] = useState({ pageIndex: 0, pageSize });
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter, pagination: server ? { pageIndex: 0, pageSize: server.pageSize } : pagination },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    onPaginationChange: setPagination,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: server ? undefined : getPaginationRowModel(),
    manualPagination: !!server,
    autoResetPageIndex: true,
  });
  const rows = table.getRowModel().rows;
  const total = server ? server.total : table.getFilteredRowModel().rows.length;
  const pageIndex = server ? server.pageIndex : pagination.pageIndex;
  const size = server ? server.pageSize : pagination.pageSize;
  const pages = Math.max(1, Math.ceil(total / size));
  const goTo = (index: number) => (server ? server.onPageChange(index) : table.setPageIndex(index));

  return (
    <div className="grid gap-2">
      {filterLabel && (
        <div className="flex items-center gap-2">
          <label htmlFor={`${label}-filter`} className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
            {filterLabel}
          </label>
          <input
            id={`${label}-filter`}
            type="search"
            value={filter}
            onChange={(event) => {
              setFilter(event.target.value);
              // A narrower filter can leave the current page empty: start again from the first page.
              setPagination((current) => ({ ...current, pageIndex: 0 }));
            }}
            className="w-64 rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm"
          />
        </div>
      )}
      <div className="overflow-x-auto">
        <table aria-label={label} className="w-full text-sm">
          <thead>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="border-b border-ink-200 text-left text-xs tracking-wide text-ink-500 uppercase">
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  const title = flexRender(header.column.columnDef.header, header.getContext());
                  return (
                    <th
                      key={header.id}
                      className="py-2 pr-4 font-semibold"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                    >
                      {header.column.getCanSort() ? (
                        <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 uppercase">
                          {title}
                          <span aria-hidden className="text-ink-300">
                            {sorted === 'asc' ? GLYPHS.sortAscending : sorted === 'desc' ? GLYPHS.sortDescending : GLYPHS.sortable}
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
            {rows.map((row) => (
              <tr key={row.id} className="border-b border-ink-100 align-top last:border-0">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="py-2 pr-4">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        {rows.length === 0 && <EmptyState>{empty}</EmptyState>}
      </div>
      <div className="flex flex-wrap items-center justify-between gap-2 text-xs text-ink-500">
        <span className="tabular-nums">
          {total} {total === 1 ? 'row' : 'rows'} · page {Math.min(pageIndex + 1, pages)} of {pages}
        </span>
        <div className="flex gap-2">
          <Button variant="secondary" disabled={pageIndex === 0} onClick={() => goTo(pageIndex - 1)}>
            Previous
          </Button>
          <Button variant="secondary" disabled={pageIndex + 1 >= pages} onClick={() => goTo(pageIndex + 1)}>
            Next
          </Button>
        </div>
      </div>
    </div>
  );
}
