/** The shared DataTable: sortable headers reachable by keyboard, the text filter and the paging line. */
import { describe, expect, it } from 'vitest';
import { fireEvent, render, screen, within } from '@testing-library/react';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../client/src/components/data-table';

type Row = { studyId: string; site: string; enrolledOn: string };

const column = createColumnHelper<Row>();
const columns = [
  column.accessor('studyId', { header: 'Study ID' }),
  column.accessor('site', { header: 'Site' }),
  column.accessor('enrolledOn', { header: 'Enrolled', enableSorting: false }),
];

// Invented rows: 25 patients over two sites, study IDs out of order so sorting shows.
const rows: Row[] = Array.from({ length: 25 }, (_, i) => {
  const n = ((i * 7) % 25) + 1;
  return { studyId: `RVG-${String(n).padStart(3, '0')}`, site: n % 2 ? 'Riverside' : 'Northgate', enrolledOn: `2026-03-${String(n).padStart(2, '0')}` };
});

const renderTable = () => render(<DataTable data={rows} columns={columns} label="Patients" filterLabel="Filter" pageSize={10} />);
const firstStudyIds = (count: number) =>
  within(screen.getByRole('table', { name: 'Patients' }))
    .getAllByRole('row')
    .slice(1, count + 1)
    .map((row) => within(row).getAllByRole('cell')[0].textContent);

describe('DataTable', () => {
  it('when a sortable header is focused and activated, then the rows sort ascending, then descending', () => {
    renderTable();
    const header = screen.getByRole('columnheader', { name: /Study ID/ });
    const sort = within(header).getByRole('button', { name: /Study ID/ });
    // A native button: the keyboard reaches it with Tab and Enter/Space activate it in every browser.
    expect(sort.tagName).toBe('BUTTON');
    expect(sort).toHaveAttribute('type', 'button');
    sort.focus();
    expect(sort).toHaveFocus();
    expect(header).not.toHaveAttribute('aria-sort');

    fireEvent.click(sort);
    expect(header).toHaveAttribute('aria-sort', 'ascending');
    expect(firstStudyIds(3)).toEqual(['RVG-001', 'RVG-002', 'RVG-003']);

    fireEvent.click(sort);
    expect(header).toHaveAttribute('aria-sort', 'descending');
    expect(firstStudyIds(3)).toEqual(['RVG-025', 'RVG-024', 'RVG-023']);
    expect(sort).toHaveFocus();
  });

  it('when a column is not sortable, then its header is plain text without a button', () => {
    renderTable();
    const header = screen.getByRole('columnheader', { name: 'Enrolled' });
    expect(within(header).queryByRole('button')).not.toBeInTheDocument();
  });

  it('when text is typed in the filter, then only matching rows remain and the count follows', () => {
    renderTable();
    expect(screen.getByText('25 rows · page 1 of 3')).toBeInTheDocument();

    fireEvent.change(screen.getByLabelText('Filter'), { target: { value: 'RVG-01' } });
    const ids = firstStudyIds(20);
    expect(ids).toHaveLength(10);
    expect(ids.every((id) => id?.startsWith('RVG-01'))).toBe(true);
    expect(screen.getByText('10 rows · page 1 of 1')).toBeInTheDocument();

    fireEvent.change(screen.getByLabelText('Filter'), { target: { value: 'RVG-007' } });
    expect(screen.getByText('1 row · page 1 of 1')).toBeInTheDocument();

    fireEvent.change(screen.getByLabelText('Filter'), { target: { value: 'nobody' } });
    expect(screen.getByText('Nothing to show.')).toBeInTheDocument();
    expect(screen.getByText('0 rows · page 1 of 1')).toBeInTheDocument();
  });

  it('when paging forward and back, then the page line and the buttons follow', () => {
    renderTable();
    const previous = screen.getByRole('button', { name: 'Previous' });
    const next = screen.getByRole('button', { name: 'Next' });
    expect(previous).toBeDisabled();
    expect(firstStudyIds(20)).toHaveLength(10);

    fireEvent.click(next);
    expect(screen.getByText('25 rows · page 2 of 3')).toBeInTheDocument();
    fireEvent.click(next);
    expect(screen.getByText('25 rows · page 3 of 3')).toBeInTheDocument();
    expect(firstStudyIds(20)).toHaveLength(5);
    expect(next).toBeDisabled();

    fireEvent.click(previous);
    expect(screen.getByText('25 rows · page 2 of 3')).toBeInTheDocument();
  });

  it('when the filter narrows the rows on a later page, then paging returns to the first page and shows the matches', () => {
    renderTable();
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    expect(screen.getByText('25 rows · page 3 of 3')).toBeInTheDocument();

    fireEvent.change(screen.getByLabelText('Filter'), { target: { value: 'RVG-01' } });
    expect(screen.getByText('10 rows · page 1 of 1')).toBeInTheDocument();
    expect(firstStudyIds(20)).toHaveLength(10);
    expect(screen.queryByText('Nothing to show.')).not.toBeInTheDocument();
    expect(screen.getByRole('button', { name: 'Previous' })).toBeDisabled();
  });
});
