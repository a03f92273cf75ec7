/**
 * A data cut's analysis as the statistician and the committee read it: per cohort the response
 * rate and its intervals, the exact test, the verdict (with patients enrolled at risk and what could
 * still change it), the two-stage inference with its sensitivity figure, the Bayesian figures, sites,
 * deviations and the boundary chart; then multiplicity, the safety section, open data issues, the
 * cautions and how verdicts are reached.
 */
import { Suspense, lazy } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { Cautions, Glyphed, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { decimal, percent, pValue } from '../../lib/format';
import { OPEN_ISSUE_WORDS, POPULATION_COUNTS, SELECTION_LABELS, SENSITIVITY_LABEL, SETTLED_EARLY, VERDICT_FIGURE_LABELS, VERDICT_WORDS, ruleLabel } from '../../../../server/words';
import type { InterimDecision } from '../../../../server/stats/index';
import type { Analysis, CohortAnalysis, OpenIssue, SiteRow } from './types';
import { SafetySection } from './safety-section';

const BoundaryChart = lazy(() => import('./cut-charts').then((m) => ({ default: m.BoundaryChart })));
const RateChart = lazy(() => import('../../components/rate-chart').then((m) => ({ default: m.RateChart })));

const interval = (ci: [number, number] | null | undefined) => (ci ? `${percent(ci[0])} – ${percent(ci[1])}` : '—');

/** The rule's verdict: a word with its glyph, never colour alone. */
export function RuleVerdict({ decision, early }: { decision: InterimDecision; early?: boolean }) {
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-ink-300 px-1.5 py-0.5 text-xs font-semibold text-ink-900">
      <Glyphed word={VERDICT_WORDS[decision]} />
      {early && <span className="font-normal text-ink-500">({SETTLED_EARLY})</span>}
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
  const rule = d.r1 !== null ? `stage 1 stops for futility if ≤ ${d.r1} of ${d.n1}; promising if > ${d.r} of ${d.n}` : `promising if > ${d.r} of ${d.n}`;
  return `${SELECTION_LABELS[d.selection]} design, version ${d.version} · p0 ${d.p0} · p1 ${d.p1} · α ${d.alpha} · β ${d.beta} · ${rule} · ${POPULATION_COUNTS[d.analysisPopulation]}`;
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
                <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">{ruleLabel(c.rule, c.design?.r1 === null)}</span>
                <RuleVerdict decision={c.rule.decision} early={c.rule.determinedEarly} />
              </p>
              <p className="text-ink-700">{c.rule.message}</p>
              {c.rule.atRiskNote && (
                <p className="text-ink-700">
                  <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">{VERDICT_FIGURE_LABELS.atRisk}: </span>
                  <strong className="tabular-nums">{c.rule.atRisk}</strong>. {c.rule.atRiskNote}
                </p>
              )}
            </div>
          )}
          {c.inference && (
            <div>
              <Table
                caption="Inference after the two-stage design"
                head={['', 'Estimate', '95% interval', 'p-value']}
                rows={[
                  ['Stage-wise ordering over the attained design, with UMVUE (primary)', percent(c.inference.umvue), interval(c.inference.ci), pValue(c.inference.pValue)],
                  ...(c.inference.sensitivity ? [[SENSITIVITY_LABEL, '—', '—', pValue(c.inference.sensitivity.pValue)]] : []),
                  ['Naive (ignores the stopping rule — biased)', percent(c.inference.naiveEstimate), interval(c.inference.naiveCi), pValue(c.exactTest?.pValue)],
                ]}
              />
              {c.inference.note && <p className="mt-1 text-xs text-ink-500">{c.inference.note}</p>}
              {c.rule?.sensitivityNote && (
                <p role="note" className="mt-1 border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
                  {c.rule.sensitivityNote}
                </p>
              )}
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
                caption="Attained size differs from the design"
                head={['Rule', 'r1/n1', 'r/n', 'Type I error', 'Power', 'PET0', 'EN0']}
                rows={[
                  ['Planned', d.n1 !== null ? `${d.r1}/${d.n1}` : '—', `${d.r}/${d.n}`, decimal(d.typeIError, 4), decimal(d.power, 4), decimal(d.pet0, 4), decimal(d.en0, 1)],
                  [
                    'As applied (thresholds for the attained sizes)',
                    c.deviation.attainedN1 !== null ? `${c.deviation.applied.r1}/${c.deviation.attainedN1}` : '—',
                    `${c.deviation.applied.r}/${c.deviation.attainedN}`,
                    ...ocCells(c.deviation.applied.characteristics),
                  ],
                ]}
              />
              <p className="mt-1 text-xs text-ink-500">{c.deviation.method}</p>
              {c.deviation.applied.note && <p className="text-xs text-ink-500">{c.deviation.applied.note}</p>}
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


const issueColumns: ColumnDef<OpenIssue, string>[] = [
  { accessorKey: 'studyId', header: 'Study ID' },
  { accessorKey: 'siteCode', header: 'Site' },
  { accessorKey: 'cohortCode', header: 'Cohort' },
  { id: 'issue', accessorFn: (row) => OPEN_ISSUE_WORDS[row.issue].label, header: 'Issue', cell: ({ row }) => <Glyphed word={OPEN_ISSUE_WORDS[row.original.issue]} /> },
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
            head={['Cohort', 'p0', 'p-value', 'Holm', 'Benjamini–Hochberg']}
            rows={multi.rows.map((r) => [r.code, r.p0, `${pValue(r.pValue)} (${r.basis === 'stage-wise' ? 'stage-wise' : 'exact binomial'})`, pValue(r.holm), pValue(r.bh)])}
          />
          <p className="mt-1 mb-3 text-xs text-ink-500">{multi.method}</p>
          <Suspense fallback={<Loading label="Loading the chart" />}>
            <RateChart title="Response by cohort" rows={cohortRows} />
          </Suspense>
        </Panel>
      )}
      <SafetySection analysis={analysis} />
      <OpenIssues issues={analysis.openIssues} />
      <Panel title={VERDICT_FIGURE_LABELS.rules}>
        <ol className="list-decimal space-y-1 pl-5 text-sm text-ink-700">
          {analysis.rulesStatement.map((rule) => (
            <li key={rule}>{rule}</li>
          ))}
        </ol>
      </Panel>
    </div>
  );
}
