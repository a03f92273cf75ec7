/**
 * Import adverse events from a CSV file (one row per event): check it first (a dry run shows each
 * row's result, and whether the file would pause a cohort's accrual), then import; a file with any
 * bad row imports nothing.
 */
import { useMemo, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { ApiError } from '../../lib/api';
import { day } from '../../lib/format';
import { Button, ErrorNotice, Figure, Panel, Spinner } from '../../components/ui';
import { GLYPHS } from '../../../../server/words';
import { CsvFileInput } from '../../components/csv-file-input';
import { DataTable } from '../../components/data-table';
import { useImportEvents } from './use-import-events';
import type { EventImportReport, EventRowResult } from './types';

const RESULT_WORDS: Record<EventRowResult['result'], { label: string; glyph: string }> = {
  new: { label: 'New', glyph: GLYPHS.added },
  update: { label: 'Correction', glyph: GLYPHS.change },
  unchanged: { label: 'Unchanged', glyph: GLYPHS.unchanged },
  error: { label: 'Error', glyph: GLYPHS.warning },
};

const column = createColumnHelper<EventRowResult>();
const columns = [
  column.accessor('line', { header: 'Line', cell: (c) => <span className="tabular-nums">{c.getValue()}</span> }),
  column.accessor('studyId', { header: 'Patient', cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
  column.accessor('onsetOn', { header: 'Onset', cell: (c) => <span className="tabular-nums">{/^\d{4}-\d{2}-\d{2}$/.test(c.getValue()) ? day(c.getValue()) : c.getValue()}</span> }),
  column.accessor('term', { header: 'Event' }),
  column.accessor((r) => RESULT_WORDS[r.result].label, {
    id: 'result',
    header: 'Result',
    cell: (c) => (
      <span className="whitespace-nowrap">
        <span aria-hidden>{RESULT_WORDS[c.row.original.result].glyph} </span>
        {RESULT_WORDS[c.row.original.result].label}
      </span>
    ),
  }),
  column.accessor((r) => r.errors.map((e) => `${e.column}: ${e.reason}`).join(' '), {
    id: 'errors',
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
  }),
];

function rejectedReport(error: unknown): EventImportReport | undefined {
  if (!(error instanceof ApiError) || error.status !== 422) return undefined;
  const { counts, rows } = error.details as Pick<EventImportReport, 'counts' | 'rows'>;
  return { dryRun: false, committed: false, counts, rows, pausedCohorts: [] };
}

export function EventImportPanel({ trialId }: { trialId: string }) {
  const [file, setFile] = useState<File | null>(null);
  const run = useImportEvents(trialId);
  const report = run.data ?? rejectedReport(run.error);
  const checkedClean = !!report && report.dryRun && report.counts.error === 0;
  const rows = useMemo(() => report?.rows ?? [], [report]);
  const paused = report?.pausedCohorts ?? [];

  return (
    <Panel title="Import adverse events from a CSV file" actions={<a className="text-xs underline" href={`/api/trials/${trialId}/adverse-events/import-template.csv`}>Download the template</a>}>
      <div className="grid gap-3">
        <p className="text-sm text-ink-700">
          One row per event: <code>study_id, onset_on, term, grade, attribution, serious, outcome, notes, correction_reason</code>. Dates as YYYY-MM-DD; grade 1
          to 5 (CTCAE v5.0) or empty until graded; attribution unrelated, unlikely, possible, probable or definite, or empty until assessed; serious yes or no. A
          row names an event by patient, onset and term: a row that changes a recorded event needs a correction reason. Check the file first; a file with any bad
          row imports nothing.
        </p>
        <div className="flex flex-wrap items-end gap-3">
          <CsvFileInput
            id="events-file"
            onChange={(chosen) => {
              setFile(chosen);
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
        {run.error && !rejectedReport(run.error) && <ErrorNotice error={run.error} title="The file was not imported" />}
        {report && (
          <>
            <p role="status" className="text-sm font-semibold">
              {report.committed
                ? 'Imported.'
                : report.dryRun
                  ? report.counts.error === 0
                    ? 'The file is ready to import.'
                    : 'Fix the rows with errors, then check the file again.'
                  : 'Nothing was imported: some rows have errors.'}
              {paused.length > 0 &&
                (report.committed
                  ? ` Accrual is now paused for a safety review in cohort ${paused.join(', ')}: the file crossed its safety rule.`
                  : ` Importing it would cross the safety rule of cohort ${paused.join(', ')} and pause its accrual.`)}
            </p>
            <div className="flex flex-wrap gap-6">
              <Figure label="Rows" value={report.counts.total} />
              <Figure label="New" value={report.counts.new} />
              <Figure label="Corrections" value={report.counts.update} />
              <Figure label="Unchanged" value={report.counts.unchanged} />
              <Figure label="Errors" value={report.counts.error} />
            </div>
            <DataTable data={rows} columns={columns} label="Import rows" filterLabel="Filter rows" initialSorting={[{ id: 'line', desc: false }]} />
          </>
        )}
      </div>
    </Panel>
  );
}
