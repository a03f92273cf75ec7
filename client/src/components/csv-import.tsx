/**
 * The parts every CSV import panel shares: choose a file, check it (a dry run), import it; the
 * status line, the counts by row result, and the columns that say what became of each row. A file
 * with any bad row imports nothing, so "Import" waits for a clean check.
 */
import type { ReactNode } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { ApiError } from '../lib/api';
import { GLYPHS, type Worded } from '../../../server/words';
import { Button, ErrorNotice, Figure, Glyphed, Spinner } from './ui';
import { CsvFileInput } from './csv-file-input';
import type { ImportCounts, RowOutcome } from '../../../server/csv/import';

type ImportedRow = { line: number; studyId: string; result: RowOutcome; errors: Array<{ column: string; reason: string }> };
type Report = { dryRun: boolean; committed: boolean; counts: ImportCounts };

const RESULT_WORDS: Record<RowOutcome, Worded> = {
  new: { label: 'New', glyph: GLYPHS.added },
  update: { label: 'Correction', glyph: GLYPHS.change },
  unchanged: { label: 'Unchanged', glyph: GLYPHS.unchanged },
  error: { label: 'Error', glyph: GLYPHS.warning },
};

/** The rows and counts of a refused commit (422): the server says which rows stopped the import. */
export function rejectedRows<R>(error: unknown): { counts: ImportCounts; rows: R[] } | undefined {
  if (!(error instanceof ApiError) || error.status !== 422) return undefined;
  return error.details as { counts: ImportCounts; rows: R[] };
}

/** The columns before and after a panel's own: line and patient first, result and reasons last. */
export function importColumns<R extends ImportedRow>(own: ColumnDef<R, string>[]): ColumnDef<R, string>[] {
  return [
    { id: 'line', accessorFn: (r) => String(r.line), header: 'Line', cell: (c) => <span className="tabular-nums">{c.row.original.line}</span> },
    { id: 'studyId', accessorFn: (r) => r.studyId, header: 'Patient', cell: (c) => <span className="font-mono">{c.row.original.studyId}</span> },
    ...own,
    { id: 'result', accessorFn: (r) => RESULT_WORDS[r.result].label, header: 'Result', cell: (c) => <span className="whitespace-nowrap"><Glyphed word={RESULT_WORDS[c.row.original.result]} /></span> },
    {
      id: 'errors',
      accessorFn: (r) => r.errors.map((e) => `${e.column}: ${e.reason}`).join(' '),
      header: 'Why',
      cell: (c) => (
        <ul className="text-xs">
          {c.row.original.errors.map((e) => (
            <li key={`${e.column}-${e.reason}`}>
              <strong>{e.column}</strong>: {e.reason}
            </li>
          ))}
        </ul>
      ),
    },
  ];
}

type ImportRun = {
  isPending: boolean;
  variables?: { dryRun: boolean };
  error: Error | null;
  mutate: (input: { file: File; dryRun: boolean }) => void;
  reset: () => void;
};

/** The file input with "Check the file" and "Import", and why a file was not imported. */
export function ImportControls({ inputId, file, onFile, run, checkedClean }: { inputId: string; file: File | null; onFile: (file: File | null) => void; run: ImportRun; checkedClean: boolean }) {
  return (
    <>
      <div className="flex flex-wrap items-end gap-3">
        <CsvFileInput
          id={inputId}
          onChange={(chosen) => {
            onFile(chosen);
            run.reset();
          }}
        />
        <Button variant="secondary" disabled={!file || run.isPending} onClick={() => file && run.mutate({ file, dryRun: true })}>
          Check the file
        </Button>
        <Button disabled={!file || !checkedClean || run.isPending} onClick={() => file && run.mutate({ file, dryRun: false })}>
          Import
        </Button>
        {run.isPending && <Spinner label={run.variables?.dryRun ? 'Checking the file' : 'Importing'} />}
      </div>
      {run.error && !rejectedRows(run.error) && <ErrorNotice error={run.error} title="The file was not imported" />}
    </>
  );
}

/** The status line (`imported` says what a commit did; `more` follows it) and the counts by row result. */
export function ImportSummary({ report, imported, more }: { report: Report; imported: string; more?: ReactNode }) {
  return (
    <>
      <p role="status" className="text-sm font-semibold">
        {report.committed
          ? imported
          : report.dryRun
            ? report.counts.error === 0
              ? 'The file is ready to import.'
              : 'Fix the rows with errors, then check the file again.'
            : 'Nothing was imported: some rows have errors.'}
        {more}
      </p>
      <div className="flex flex-wrap gap-6">
        <Figure label="Rows" value={report.counts.total} />
        <Figure label="New" value={report.counts.new} />
        <Figure label="Corrections" value={report.counts.update} />
        <Figure label="Unchanged" value={report.counts.unchanged} />
        <Figure label="Errors" value={report.counts.error} />
      </div>
    </>
  );
}
