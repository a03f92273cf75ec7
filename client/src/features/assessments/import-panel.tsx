/**
 * Import assessments from a CSV file (one row per assessment): check it first (a dry run shows
 * each row's result), then import; a file with any bad row imports nothing.
 */
import { useMemo, useState } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { dayAsWritten } from '../../lib/format';
import { Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { ImportControls, ImportSummary, importColumns, rejectedRows } from '../../components/csv-import';
import { plural } from '../../../../server/words';
import { useImportAssessments, type ImportReport, type ImportRow } from './use-import-assessments';

const columns = importColumns<ImportRow>([
  {
    id: 'date',
    accessorFn: (r) => r.date,
    header: 'Date',
    cell: (c) => <span className="tabular-nums">{dayAsWritten(c.row.original.date)}</span>,
  } satisfies ColumnDef<ImportRow, string>,
]);

function rejectedReport(error: unknown): ImportReport | undefined {
  const rejected = rejectedRows<ImportRow>(error);
  return rejected && { dryRun: false, committed: false, ...rejected, derivationsChanged: 0 };
}

export function ImportPanel({ trialId }: { trialId: string }) {
  const [file, setFile] = useState<File | null>(null);
  const run = useImportAssessments(trialId);
  const report = run.data ?? rejectedReport(run.error);
  const checkedClean = !!report && report.dryRun && report.counts.error === 0;
  const rows = useMemo(() => report?.rows ?? [], [report]);

  return (
    <Panel title="Import assessments from a CSV file" actions={<a className="text-xs underline" href={`/api/trials/${trialId}/assessments/import-template.csv`}>Download the template</a>}>
      <div className="grid gap-3">
        <p className="text-sm text-ink-700">
          One row per assessment: <code>study_id, date, response, notes, correction_reason</code>. Dates as YYYY-MM-DD; responses CR, PR, SD, PD or NE. A row
          that changes a recorded assessment needs a correction reason. Check the file first; a file with any bad row imports nothing.
        </p>
        <ImportControls inputId="assessments-file" file={file} onFile={setFile} run={run} checkedClean={checkedClean} />
        {report && (
          <>
            <ImportSummary
              report={report}
              imported={`Imported. ${plural(report.derivationsChanged, 'patient')} had the derived best overall response change.`}
            />
            <DataTable data={rows} columns={columns} label="Import rows" filterLabel="Filter rows" initialSorting={[{ id: 'line', desc: false }]} />
          </>
        )}
      </div>
    </Panel>
  );
}
