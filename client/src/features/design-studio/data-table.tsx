/** A TanStack table in Orrery's print-like look: click a header to sort, type to filter, page through long lists. */
import { useState } from 'react';
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
import { Button } from '../../components/ui';

type Props<T> = {
  data: T[];
  /** Each column reads a value of its own type, hence `any` for the value. */
  columns: Array<ColumnDef<T, any>>;
  caption: string;
  filterLabel: string;
  pageSize?: number;
  rowClassName?: (row: T) => string;
};

export function DataTable<T>({ data, columns, caption, filterLabel, pageSize = 10, rowClassName }: Props<T>) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [globalFilter, setGlobalFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize } },
  });
  const filterId = `filter-${caption.replace(/\W+/g, '-').toLowerCase()}`;
  return (
    <div>
      <div className="mb-2 flex items-center gap-2">
        <label htmlFor={filterId} className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
          {filterLabel}
        </label>
        <input
          id={filterId}
          value={globalFilter}
          onChange={(event) => setGlobalFilter(event.target.value)}
          className="rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm"
        />
      </div>
      <div className="overflow-x-auto">
        <table className="w-full text-sm tabular-nums">
          <caption className="sr-only">{caption}</caption>
          <thead>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="border-b border-ink-200 text-left text-xs tracking-wide text-ink-500 uppercase">
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      className="py-2 pr-3 font-semibold"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                    >
                      {header.column.getCanSort() ? (
                        <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 uppercase">
                          {flexRender(header.column.columnDef.header, header.getContext())}
                          <span aria-hidden>{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                        </button>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className={`border-b border-ink-100 last:border-0 ${rowClassName?.(row.original) ?? ''}`}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="py-1.5 pr-3 align-top">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {table.getRowModel().rows.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="py-4 text-center text-ink-500">
                  Nothing matches the filter.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      {table.getPageCount() > 1 && (
        <div className="mt-2 flex items-center gap-2 text-xs text-ink-500">
          <Button variant="secondary" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </Button>
          <span>
            Page {table.getState().pagination.pageIndex + 1} of {table.getPageCount()}
          </span>
          <Button variant="secondary" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </Button>
        </div>
      )}
    </div>
  );
}
