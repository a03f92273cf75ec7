/** What identifies a data cut, and its downloads: shown by the cut's page and by its committee review. */
import { Figure, Panel } from '../../components/ui';
import { dateTime } from '../../lib/format';
import { DownloadButton } from './download-button';
import type { Analysis, DataCut } from './types';
import { GLYPHS, STATUS_WORDS } from '../../../../server/words';

/** The cut's identity and counts. */
export function CutHeader({ cut, analysis }: { cut: DataCut; analysis?: Analysis }) {
  const intact = analysis?.integrity.intact;
  return (
    <Panel title={`Data cut ${cut.seq} · ${cut.kind === 'final' ? 'final' : 'interim'} analysis`}>
      <div className="flex flex-wrap gap-6">
        <Figure label="Patients" value={cut.counts.patients} />
        <Figure label="Pending outcomes" value={cut.counts.pending} />
        <Figure label="Unattested outcomes" value={cut.counts.unattested} />
        <Figure label="Outcome flags" value={cut.counts.flagged} />
        <Figure label="Not evaluable" value={cut.counts.notEvaluable} />
      </div>
      <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-xs text-ink-600">
        <dt>Cut at</dt>
        <dd>{dateTime(cut.cutAt)}</dd>
        <dt>Cohorts</dt>
        <dd>{cut.snapshot.cohorts.map((c) => `${c.code} (${STATUS_WORDS[c.status].label.toLowerCase()} at the cut)`).join(', ')}</dd>
        <dt>Content hash</dt>
        <dd className="font-mono break-all">{cut.contentHash}</dd>
        {analysis && (
          <>
            <dt>Frozen copy</dt>
            <dd>
              {intact ? (
                <span>
                  <span aria-hidden>{GLYPHS.done} </span>Intact: the copy still matches its hash
                </span>
              ) : (
                <strong className="text-alert-600">
                  <span aria-hidden>{GLYPHS.warning} </span>Does not match its hash
                </strong>
              )}
            </dd>
          </>
        )}
        {cut.reportHash && (
          <>
            <dt>Last report hash</dt>
            <dd className="font-mono break-all">{cut.reportHash}</dd>
          </>
        )}
      </dl>
    </Panel>
  );
}

export function Downloads({ cut }: { cut: DataCut }) {
  const base = `${cut.snapshot.trial.code}-data-cut-${cut.seq}`;
  return (
    <div className="flex flex-wrap gap-3">
      <DownloadButton href={`/api/data-cuts/${cut.id}/report.pdf`} filename={`${base}.pdf`} label="Report (PDF)" busyLabel="Preparing the report" />
      <DownloadButton href={`/api/data-cuts/${cut.id}/export.csv`} filename={`${base}-patients.csv`} label="Patients and outcomes (CSV)" busyLabel="Preparing the export" />
      <DownloadButton href={`/api/data-cuts/${cut.id}/adrs.csv`} filename={`${base}-adrs.csv`} label="Response dataset, ADaM names (CSV)" busyLabel="Preparing the dataset" />
      <DownloadButton href={`/api/data-cuts/${cut.id}/ae.csv`} filename={`${base}-ae.csv`} label="Adverse events, SDTM AE names (CSV)" busyLabel="Preparing the dataset" />
    </div>
  );
}
