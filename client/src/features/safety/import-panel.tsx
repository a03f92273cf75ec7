/**
 * Import adverse events from a CSV file (one row per event): check it first (a dry run shows each
 * row's result, and whether the file would pause a cohort's accrual), then import; a file with any
 * bad row imports nothing.
 */
import { useMemo, useState } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { dayAsWritten } from '../../lib/format';
import { Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { ImportControls, ImportSummary, importColumns, rejectedRows } from '../../components/csv-import';
import { useImportEvents } from './use-import-events';
import type { EventImportReport, EventRowResult } from './types';

const columns = importColumns<EventRowResult>([
  {
    id: 'onsetOn',
    accessorFn: (r) => r.onsetOn,
    header: 'Onset',
    cell: (c) => <span className="tabular-nums">{dayAsWritten(c.row.original.onsetOn)}</span>,
  } satisfies ColumnDef<EventRowResult, string>,
  { id: 'term', accessorFn: (r) => r.term, header: 'Event' } satisfies ColumnDef<EventRowResult, string>,
]);

function rejectedReport(error: unknown): EventImportReport | undefined {
  const rejected = rejectedRows<EventRowResult>(error);
  return rejected && { dryRun: false, committed: false, ...rejected, pausedCohorts: [] };
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
        <ImportControls inputId="events-file" file={file} onFile={setFile} run={run} checkedClean={checkedClean} />
        {report && (
          <>
            <ImportSummary
              report={report}
              imported="Imported."
              more={
                paused.length > 0 &&
                (report.committed
                  ? ` Accrual is now paused for a safety review in cohort ${paused.join(', ')}: the file crossed its safety rule.`
                  : ` Importing it would cross the safety rule of cohort ${paused.join(', ')} and pause its accrual.`)              }
            />
            <DataTable data={rows} columns={columns} label="Import rows" filterLabel="Filter rows" initialSorting={[{ id: 'line', desc: false }]} />
          </>
        )}
      </div>
    </Panel>
  );
}
