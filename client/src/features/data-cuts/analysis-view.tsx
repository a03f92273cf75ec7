/**
 * A data cut's analysis as the statistician and the committee read it: per cohort the response
 * rate and its intervals, the exact test, the rule, the two-stage inference, the Bayesian figures,
 * sites, deviations and the boundary chart; then multiplicity, the safety section, open data issues
 * and the cautions.
 */
import { Suspense, lazy } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { Cautions, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { decimal, percent, pValue } from '../../lib/format';
import type { Analysis, CohortAnalysis, OpenIssue, SiteRow } from './types';
import { SafetySection } from './safety-section';

const BoundaryChart = lazy(() => import('./cut-charts').then((m) => ({ default: m.BoundaryChart })));
const RateChart = lazy(() => import('../../components/rate-chart').then((m) => ({ default: m.RateChart })));

const interval = (ci: [number, number] | null | undefined) => (ci ? `${percent(ci[0])} – ${percent(ci[1])}` : '—');

const RULE_WORDS: Record<string, { icon: string; text: string }> = {
  continue: { icon: '▸', text: 'Stage 1 passed: continue' },
  'stop-futility': { icon: '■', text: 'Futility rule met' },
  promising: { icon: '✓', text: 'Promising' },
  'not-promising': { icon: '✗', text: 'Not promising' },
  undetermined: { icon: '…', text: 'Not yet decided' },
};

/** The rule's verdict: a word with an icon, never colour alone. */
export function RuleVerdict({ decision, early }: { decision: string; early?: boolean }) {
  const word = RULE_WORDS[decision] ?? { icon: '•', text: decision };
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-ink-300 px-1.5 py-0.5 text-xs font-semibold text-ink-900">
      <span aria-hidden>{word.icon}</span>
      {word.text}
      {early && <span className="font-normal text-ink-500">(determined early)</span>}
    </span>
  );
}

export function Table({ head, rows, caption }: { head: string[]; rows: Array<Array<string | number>>; caption?: string }) {
  return (
    <table className="w-full text-sm tabular-nums">
      {caption && <caption className="pb-1 text-left text-xs font-semibold tracking-wide text-ink-500 uppercase">{caption}</caption>}
      <thead>
        <tr className="border-b border-ink-200 text-left text-xs text-ink-500">
          {head.map((h) => (
            <th key={h} scope="col" className="py-1.5 pr-3 font-medium">
              {h}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {rows.map((row, i) => (
          <tr key={i} className="border-b border-ink-100 last:border-0">
            {row.map((cell, j) => (
              <td key={j} className="py-1.5 pr-3">
                {cell}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function designText(c: CohortAnalysis): string {
  const d = c.design;
  if (!d) return 'No locked design at the cut.';
  const rule = d.r1 !== null ? `stop if ≤ ${d.r1} of ${d.n1}; promising if > ${d.r} of ${d.n}` : `promising if > ${d.r} of ${d.n}`;
  return `${d.selection.replace('_', '-')} design v${d.version} · p0 ${d.p0} · p1 ${d.p1} · α ${d.alpha} · β ${d.beta} · ${rule} · ${d.analysisPopulation === 'all_enrolled' ? 'all enrolled count' : 'evaluable patients count'}`;
}

function CohortSection({ cohort: c }: { cohort: CohortAnalysis }) {
  const d = c.design;
  return (
    <Panel title={`Cohort ${c.code} · ${c.name}`}>
      <p className="mb-3 text-xs text-ink-600">{designText(c)}</p>
      {c.counts && (
        <div className="grid gap-4">
          <Table
            caption="Counts at the cut"
            head={['Enrolled', 'Counted', 'Decided', 'Responders', 'Pending', 'Not evaluable', 'Stage 1', 'Stage 2']}
            rows={[[c.counts.enrolled, c.counts.counted, c.counts.decided, c.counts.responders, c.counts.pending, c.counts.notEvaluable, `${c.counts.stage1.responders}/${c.counts.stage1.decided}`, `${c.counts.stage2.responders}/${c.counts.stage2.decided}`]]}
          />
          {c.responseRate ? (
            <Table
              caption="Response rate"
              head={['Responders / decided', 'Rate', 'Clopper–Pearson 95%', 'Wilson 95%', 'Jeffreys 95%', 'Exact one-sided p vs p0']}
              rows={[[`${c.responseRate.responders} / ${c.responseRate.decided}`, percent(c.responseRate.estimate), interval(c.responseRate.clopperPearson), interval(c.responseRate.wilson), interval(c.responseRate.jeffreys), pValue(c.exactTest?.pValue)]]}
            />
          ) : (
            <p className="text-sm text-ink-500">No decided outcome yet.</p>
          )}
          {c.rule && (
            <div className="text-sm">
              <p className="mb-1 flex flex-wrap items-center gap-2">
                <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">{c.rule.applied === 'stage1' ? 'Stage-1 rule' : 'Final rule'}</span>
                <RuleVerdict decision={c.rule.decision} early={c.rule.determinedEarly} />
              </p>
              <p className="text-ink-700">{c.rule.message}</p>
            </div>
          )}
          {c.inference && (
            <div>
              <Table
                caption="Inference after the two-stage design"
                head={['', 'Estimate', '95% interval', 'p-value']}
                rows={[
                  ['Stage-wise ordering with UMVUE', percent(c.inference.umvue), interval(c.inference.ci), pValue(c.inference.pValue)],
                  ['Naive (ignores the stopping rule — biased)', percent(c.inference.naiveEstimate), interval(c.inference.naiveCi), pValue(c.exactTest?.pValue)],
                ]}
              />
              {c.inference.note && <p className="mt-1 text-xs text-ink-500">{c.inference.note}</p>}
            </div>
          )}
          {c.inferenceNote && <p className="text-xs text-ink-500">{c.inferenceNote}</p>}
          {c.bayes && (
            <div>
              <Table
                caption="Bayesian monitoring"
                head={['Posterior P(p > p0)', 'Predictive probability of success', 'θT', 'nmax']}
                rows={[[decimal(c.bayes.posteriorProbability, 4), decimal(c.bayes.predictiveProbability, 4), decimal(c.bayes.thetaT, 2), c.bayes.nmax]]}
              />
              <p className="mt-1 text-xs text-ink-500">{c.bayes.statement}</p>
            </div>
          )}
          {c.deviation && d && (
            <div>
              <Table
                caption="Actual size differs from the design"
                head={['Rule', 'r1/n1', 'r/n', 'Type I error', 'Power', 'PET0', 'EN0']}
                rows={[
                  ['Planned', d.n1 !== null ? `${d.r1}/${d.n1}` : '—', `${d.r}/${d.n}`, decimal(d.typeIError, 4), decimal(d.power, 4), decimal(d.pet0, 4), decimal(d.en0, 1)],
                  ['As applied (planned thresholds, actual sizes)', c.deviation.actualN1 !== null ? `${d.r1}/${c.deviation.actualN1}` : '—', `${d.r}/${c.deviation.actualN}`, ...ocCells(c.deviation.asApplied.characteristics)],
                  ['Adjusted thresholds', c.deviation.actualN1 !== null ? `${c.deviation.adjusted.r1 ?? '—'}/${c.deviation.actualN1}` : '—', `${c.deviation.adjusted.r ?? '—'}/${c.deviation.actualN}`, ...ocCells(c.deviation.adjusted.characteristics)],
                ]}
              />
              <p className="mt-1 text-xs text-ink-500">{c.deviation.method}</p>
              {[c.deviation.asApplied.note, c.deviation.adjusted.note].filter(Boolean).map((note) => (
                <p key={note} className="text-xs text-ink-500">
                  {note}
                </p>
              ))}
            </div>
          )}
          <p className="text-xs text-ink-600">
            Responders resting on outcomes derived from assessments: <strong className="tabular-nums">{c.responderSources.derived}</strong>; on entered outcomes:{' '}
            <strong className="tabular-nums">{c.responderSources.entered}</strong>.
          </p>
          <div className="grid gap-4 lg:grid-cols-2">
            <figure>
              <figcaption className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">Responders against the stopping boundaries</figcaption>
              <Suspense fallback={<Loading label="Loading the chart" />}>
                <BoundaryChart cohort={c} />
              </Suspense>
            </figure>
            {d && (
              <figure>
                <figcaption className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">Response rate by site</figcaption>
                <Suspense fallback={<Loading label="Loading the chart" />}>
                  <RateChart title={`Response by site in cohort ${c.code}`} rows={c.sites.map((s) => ({ label: s.siteCode, estimate: s.estimate, ci: s.ci, p0: d.p0, p1: d.p1 }))} />
                </Suspense>
              </figure>
            )}
          </div>
          <SitesTable sites={c.sites} />
          {c.heterogeneity && (
            <p className="text-sm text-ink-700">
              Heterogeneity across {c.heterogeneity.sites} sites: chi-square {decimal(c.heterogeneity.chiSquare, 3)} on {c.heterogeneity.df} df, p {pValue(c.heterogeneity.pValueChiSquare)}; exact (Fisher /
              Freeman–Halton) p {pValue(c.heterogeneity.pValueExact)}.
            </p>
          )}
          {c.heterogeneityNote && <p className="text-xs text-ink-500">{c.heterogeneityNote}</p>}
        </div>
      )}
      {c.cautions.length > 0 && (
        <div className="mt-4">
          <Cautions items={c.cautions} />
        </div>
      )}
    </Panel>
  );
}

const ocCells = (oc: { typeIError: number; power: number; pet0: number | null; en0: number } | null) =>
  oc ? [decimal(oc.typeIError, 4), decimal(oc.power, 4), decimal(oc.pet0, 4), decimal(oc.en0, 1)] : ['—', '—', '—', '—'];

function SitesTable({ sites }: { sites: SiteRow[] }) {
  return (
    <Table
      caption="Response by site"
      head={['Site', 'Enrolled', 'Decided', 'Responders', 'Rate', 'Exact 95% interval']}
      rows={sites.map((s) => [s.siteCode, s.enrolled, s.decided, s.responders, percent(s.estimate), interval(s.ci)])}
    />
  );
}

const ISSUE_WORDS: Record<OpenIssue['issue'], string> = {
  pending_outcome: '⧗ Outcome pending',
  unattested_outcome: '✎ Not attested',
  outcome_flag: '⚑ Outcome flagged',
  not_evaluable: '⊘ Not evaluable',
};

const issueColumns: ColumnDef<OpenIssue, string>[] = [
  { accessorKey: 'studyId', header: 'Study ID' },
  { accessorKey: 'siteCode', header: 'Site' },
  { accessorKey: 'cohortCode', header: 'Cohort' },
  { id: 'issue', accessorFn: (row) => ISSUE_WORDS[row.issue], header: 'Issue' },
  { accessorKey: 'detail', header: 'Detail' },
];

export function OpenIssues({ issues }: { issues: OpenIssue[] }) {
  return (
    <Panel title={`Open data issues at the cut (${issues.length})`}>
      <DataTable data={issues} columns={issueColumns} label="Open data issues at the cut" filterLabel="Filter the issues" pageSize={15} empty="No open data issue at the cut." />
    </Panel>
  );
}

export function AnalysisView({ analysis }: { analysis: Analysis }) {
  const multi = analysis.multiplicity;
  const cohortRows = analysis.cohorts
    .filter((c) => c.design && c.responseRate)
    .map((c) => ({ label: c.code, estimate: c.responseRate?.estimate ?? null, ci: c.responseRate?.clopperPearson ?? null, p0: c.design?.p0 ?? 0, p1: c.design?.p1 ?? 0 }));
  return (
    <div className="grid gap-4">
      <Cautions items={analysis.cautions} />
      {analysis.cohorts.map((cohort) => (
        <CohortSection key={cohort.cohortId} cohort={cohort} />
      ))}
      {multi && (
        <Panel title="Across cohorts">
          <Table
            head={['Cohort', 'p0', 'Exact one-sided p', 'Holm', 'Benjamini–Hochberg']}
            rows={multi.rows.map((r) => [r.code, r.p0, pValue(r.pValue), pValue(r.holm), pValue(r.bh)])}
          />
          <p className="mt-1 mb-3 text-xs text-ink-500">{multi.method}</p>
          <Suspense fallback={<Loading label="Loading the chart" />}>
            <RateChart title="Response by cohort" rows={cohortRows} />
          </Suspense>
        </Panel>
      )}
      <SafetySection analysis={analysis} />
      <OpenIssues issues={analysis.openIssues} />
    </div>
  );
}
