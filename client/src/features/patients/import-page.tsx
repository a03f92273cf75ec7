/**
 * CSV import: download the template, check the file (a dry run that writes nothing and shows every
 * row's result), then import it — all rows or none. Progress is shown while the file uploads and
 * while the server works through it.
 */
import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, ErrorNotice, Figure, PageHeader, Panel, Spinner } from '../../components/ui';
import { CsvFileInput } from '../../components/csv-file-input';
import { DataTable } from '../../components/data-table';
import { ApiError } from '../../lib/api';
import { IMPORT_MAX_ROWS } from '../../../../server/patients/patients.schema';
import { useTrialContext } from '../trials';
import { useImportPatients } from './use-import-patients';
import type { ImportCounts, ImportReport, RowResult } from './types';
import { ROW_RESULT_WORDS } from './words';
import { GLYPHS } from '../../../../server/words';

const column = createColumnHelper<RowResult>();
const columns = [
  column.accessor('line', { header: 'Line', cell: (c) => <span className="tabular-nums">{c.getValue()}</span> }),
  column.accessor('studyId', { header: 'Study ID', cell: (c) => <span className="font-mono">{c.getValue() || '—'}</span> }),
  column.accessor('result', {
    header: 'Result',
    cell: (c) => (
      <span className={`whitespace-nowrap ${c.getValue() === 'error' ? 'font-semibold text-alert-600' : ''}`}>
        <span aria-hidden>{ROW_RESULT_WORDS[c.getValue()].glyph} </span>
        {ROW_RESULT_WORDS[c.getValue()].label}
        {c.row.original.correction ? ' (correction)' : ''}
      </span>
    ),
  }),
  column.accessor((r) => r.errors.map((e) => `${e.column}: ${e.reason}`).join(' '), {
    id: 'errors',
    header: 'Column and reason',
    enableSorting: false,
    cell: (c) =>
      c.row.original.errors.length ? (
        <ul>
          {c.row.original.errors.map((e) => (
            <li key={e.column + e.reason}>
              <span className="font-mono text-xs">{e.column}</span> — {e.reason}
            </li>
          ))}
        </ul>
      ) : c.row.original.attestationCleared ? (
        'The attestation will be cleared.'
      ) : (
        ''
      ),
  }),
];

function Counts({ counts }: { counts: ImportCounts }) {
  return (
    <div className="flex flex-wrap gap-6">
      <Figure label="Rows" value={counts.total} />
      <Figure label="New patients" value={counts.new} />
      <Figure label="Updates" value={counts.update} />
      <Figure label="Unchanged" value={counts.unchanged} />
      <Figure label="Errors" value={counts.error} />
    </div>
  );
}

export function ImportPage() {
  const trial = useTrialContext();
  const importer = useImportPatients(trial.id);
  const [file, setFile] = useState<File | null>(null);
  const [checked, setChecked] = useState<{ file: File; report: ImportReport } | null>(null);
  const [done, setDone] = useState<ImportReport | null>(null);
  const report = done ?? checked?.report ?? null;
  const rejected = importer.error instanceof ApiError && importer.error.code === 'import_rejected' ? (importer.error.details as { rows: RowResult[]; counts: ImportCounts }) : null;
  const rows = useMemo(() => rejected?.rows ?? report?.rows ?? [], [rejected, report]);

  async function run(dryRun: boolean) {
    if (!file) return;
    setDone(null);
    const result = await importer.mutateAsync({ file, dryRun }).catch(() => null);
    if (!result) return;
    if (dryRun) setChecked({ file, report: result });
    else {
      setDone(result);
      setChecked(null);
    }
  }

  const readyToCommit = checked && checked.file === file && checked.report.counts.error === 0 && !done;
  return (
    <div className="grid gap-4">
      <PageHeader
        title="Import patients from a CSV"
        subtitle={`Up to ${IMPORT_MAX_ROWS} rows and 1 MB per file, your own sites only. Nothing is written until you import, and then all rows or none.`}
        actions={
          <Link to=".." relative="path" className="text-sm text-ink-700 underline-offset-2 hover:underline">
            {GLYPHS.back} All patients
          </Link>
        }
      />
      <Panel title="1 · The file">
        <div className="grid gap-3 text-sm">
          <p>
            Start from the{' '}
            <a href={`/api/trials/${trial.id}/patients/import-template.csv`} download className="font-semibold underline underline-offset-2">
              template (CSV)
            </a>{' '}
            or from the Patients page's export. One row per patient; dates as YYYY-MM-DD; outcome <code>pending</code>, <code>responder</code> or <code>non_responder</code>;
            evaluable <code>yes</code> or <code>no</code>. A change to a recorded outcome needs a <code>correction_reason</code>. Cells that start like a spreadsheet formula
            (=, +, -, @) are kept as text.
          </p>
          <div className="flex flex-wrap items-end gap-3">
            <CsvFileInput
              id="import-file"
              onChange={(chosen) => {
                setFile(chosen);
                setChecked(null);
                setDone(null);
                importer.reset();
              }}
            />
            <Button onClick={() => run(true)} disabled={!file || importer.isPending}>
              Check the file
            </Button>
            <Button variant="secondary" onClick={() => run(false)} disabled={!readyToCommit || importer.isPending}>
              Import {checked ? `${checked.report.counts.new + checked.report.counts.update} rows` : ''}
            </Button>
          </div>
          {importer.isPending && (
            <div className="grid gap-1" aria-live="polite">
              {importer.progress.phase === 'uploading' ? (
                <>
                  <label htmlFor="import-progress" className="text-xs text-ink-600">
                    Uploading…
                  </label>
                  <progress id="import-progress" max={1} value={importer.progress.fraction} className="h-2 w-72 accent-ink-900" />
                </>
              ) : (
                <Spinner label="The server is checking every row" />
              )}
            </div>
          )}
        </div>
      </Panel>
      {importer.error && !rejected && <ErrorNotice error={importer.error} title="The file was refused" />}
      {(report || rejected) && (
        <Panel title={done ? '3 · Imported' : rejected ? 'Not imported' : '2 · What the import would do'}>
          <div className="grid gap-3">
            {done && (
              <p role="status" className="text-sm">
                <span aria-hidden>{GLYPHS.done} </span>Imported: every row was applied and audited.
                {done.pausedCohorts.length > 0 && ` Stage 1 is now complete in ${done.pausedCohorts.join(', ')}: accrual is paused for the interim review.`}
              </p>
            )}
            {rejected && <ErrorNotice error={importer.error} title="Nothing was imported" />}
            {!done && !rejected && report && report.counts.error > 0 && (
              <p role="alert" className="text-sm text-alert-600">
                <span aria-hidden>{GLYPHS.warning} </span>Fix the rows with errors in your spreadsheet, save it as CSV and check it again. Nothing has been written.
              </p>
            )}
            {!done && !rejected && report && report.pausedCohorts.length > 0 && (
              <p className="text-sm text-ink-700">
                <span aria-hidden>{GLYPHS.paused} </span>Importing completes stage 1 of {report.pausedCohorts.join(', ')}: accrual will pause for the interim review.
              </p>
            )}
            <Counts counts={rejected?.counts ?? (report as ImportReport).counts} />
            <DataTable data={rows} columns={columns} label="Row results" filterLabel="Find" pageSize={50} />
          </div>
        </Panel>
      )}
    </div>
  );
}
