/**
 * One data cut: what was frozen (counts, hash, integrity), the downloads, the prior editor for the
 * statistician, and the full analysis computed from the frozen copy.
 */
import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { hasAnyRole } from '../../lib/roles';
import { useTrialContext } from '../trials';
import { useDataCut } from './get-data-cut';
import { useAnalysis } from './get-analysis';
import { AnalysisView } from './analysis-view';
import { CutHeader, Downloads } from './cut-summary';
import { PriorEditor } from './prior-editor';
import type { PriorQuery } from './types';
import { GLYPHS } from '../../../../server/words';

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
            <span aria-hidden>{GLYPHS.done} </span>Committee review ({detail.data.recommendations.length} of {detail.data.committeeSize} signed)
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
            <span aria-hidden>{GLYPHS.note} </span>Showing a prior tried on this page only; it is not saved.
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
