/**
 * One data cut: what was frozen (counts, hash, integrity), the downloads, the prior editor for the
 * statistician, and the full analysis computed from the frozen copy.
 */
import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { ErrorNotice, Figure, Loading, PageHeader, Panel } from '../../components/ui';
import { dateTime } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { useTrialContext } from '../trials';
import { useDataCut } from './get-data-cut';
import { useAnalysis } from './get-analysis';
import { AnalysisView } from './analysis-view';
import { DownloadButton } from './download-button';
import { PriorEditor } from './prior-editor';
import type { Analysis, DataCut, PriorQuery } from './types';

/** The cut's identity and counts, shared by the analysis and committee pages. */
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
        <dd>{cut.snapshot.cohorts.map((c) => `${c.code} (${c.status.replace(/_/g, ' ')} at the cut)`).join(', ')}</dd>
        <dt>Content hash</dt>
        <dd className="font-mono break-all">{cut.contentHash}</dd>
        {analysis && (
          <>
            <dt>Frozen copy</dt>
            <dd>
              {intact ? (
                <span>
                  <span aria-hidden>✓ </span>Intact: the copy still matches its hash
                </span>
              ) : (
                <strong className="text-alert-600">
                  <span aria-hidden>⚠ </span>Does not match its hash
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
    </div>
  );
}

export function CutPage() {
  const trial = useTrialContext();
  const { cutId = '' } = useParams();
  const [tried, setTried] = useState<PriorQuery>({});
  const detail = useDataCut(cutId);
  const analysis = useAnalysis(cutId, tried);
  if (detail.isPending) return <Loading label="Loading the data cut" />;
  if (detail.error) return <ErrorNotice error={detail.error} title="This data cut could not be opened" />;
  const cut = detail.data.dataCut;
  const isStatistician = hasAnyRole(trial.myRoles, ['statistician']);
  return (
    <div className="grid gap-4">
      <PageHeader
        title={`Data cut ${cut.seq}`}
        subtitle="Every figure below is computed from the frozen copy, never from live data."
        actions={
          <Link to="review" className="rounded-sm border border-ink-300 px-3 py-1.5 text-sm font-semibold text-ink-900 hover:border-ink-500">
            <span aria-hidden>✍ </span>Committee review ({detail.data.recommendations.length} of {detail.data.committeeSize} signed)
          </Link>
        }
      />
      <CutHeader cut={cut} analysis={analysis.data} />
      <Panel title="Report and exports">
        <Downloads cut={cut} />
      </Panel>
      <Panel title="Prior for the Bayesian figures">
        <p className="mb-3 text-sm text-ink-700">{analysis.data?.prior.statement}</p>
        {Object.keys(tried).length > 0 && (
          <p className="mb-3 text-xs font-semibold text-brass-700">
            <span aria-hidden>⚗ </span>Showing a prior tried on this page only; it is not saved.
          </p>
        )}
        {isStatistician ? <PriorEditor cut={cut} onTry={setTried} /> : <p className="text-xs text-ink-500">The trial statistician sets the prior.</p>}
      </Panel>
      {analysis.isPending ? (
        <Loading label="Computing the analysis" />
      ) : analysis.error ? (
        <ErrorNotice error={analysis.error} title="The analysis could not be computed" />
      ) : (
        <AnalysisView analysis={analysis.data} />
      )}
    </div>
  );
}
