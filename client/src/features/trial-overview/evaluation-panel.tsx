/**
 * The live evaluation of each cohort on the Trial overview: counts, the response rate with its
 * exact interval, the one-sided exact test against p0, the cohort's verdict under its locked design
 * (with early determination and what it means for accrual, patients enrolled at risk, what could
 * still change it, and at a final analysis the p-value it follows with its sensitivity figure), and
 * the cautions. Charts load on demand.
 */
import { Suspense, lazy } from 'react';
import { Cautions, ErrorNotice, Figure, Glyphed, Loading, Panel, StatusTag } from '../../components/ui';
import { decimal, percent, pValue } from '../../lib/format';
import { GLYPHS, POPULATION_COUNTS, SETTLED_EARLY, VERDICT_FIGURE_LABELS, VERDICT_WORDS, ruleLabel, stillOpen } from '../../../../server/words';
import { useEvaluation, type CohortEvaluation } from './get-evaluation';

const EvaluationChart = lazy(() => import('./evaluation-chart').then((m) => ({ default: m.EvaluationChart })));
const RateChart = lazy(() => import('../../components/rate-chart').then((m) => ({ default: m.RateChart })));

function CohortBlock({ cohort, confLevel }: { cohort: CohortEvaluation; confLevel: number }) {
  const design = cohort.design;
  return (
    <section aria-label={`Cohort ${cohort.cohortCode}`} className="grid gap-3 border-t border-ink-100 pt-3 first:border-0 first:pt-0">
      <div className="flex flex-wrap items-center gap-2">
        <h3 className="text-sm font-semibold text-ink-900">
          <span className="font-mono text-xs text-ink-500">{cohort.cohortCode}</span> {cohort.cohortName}
        </h3>
        <StatusTag status={cohort.status} />
        {design && (
          <span className="text-xs text-ink-500 tabular-nums">
            Design v{design.version}: p0 {decimal(design.p0, 2)}, p1 {decimal(design.p1, 2)}
            {design.r1 !== null ? `, r1/n1 ${design.r1}/${design.n1}` : ''}, r/n {design.r}/{design.n} · {POPULATION_COUNTS[design.analysisPopulation]}
          </span>
        )}
      </div>
      <div className="flex flex-wrap gap-6">
        <Figure label="Enrolled" value={cohort.enrolled} hint={`${cohort.counted} counted`} />
        {!cohort.responseHidden && (
          <>
            <Figure label="Responders / decided" value={`${cohort.responders} / ${cohort.decided}`} hint={`${cohort.pending} pending · ${cohort.notEvaluable} not evaluable`} />
            <Figure
              label="Response rate"
              value={cohort.rate ? percent(cohort.rate.estimate) : '—'}
              hint={cohort.rate ? `${Math.round(confLevel * 100)}% exact CI ${percent(cohort.rate.ci[0])} – ${percent(cohort.rate.ci[1])}` : 'No outcome yet'}
            />
            <Figure label="One-sided p vs p0" value={cohort.test ? pValue(cohort.test.pValue) : '—'} hint={cohort.test ? `exact binomial, H0: p ≤ ${decimal(cohort.test.p0, 2)}` : undefined} />
            {cohort.rule && cohort.rule.atRisk > 0 && <Figure label={VERDICT_FIGURE_LABELS.atRisk} value={cohort.rule.atRisk} hint={VERDICT_FIGURE_LABELS.atRiskHint} />}
            {cohort.rule?.finalTest && cohort.rule.applied === 'final' && (
              <Figure label={VERDICT_FIGURE_LABELS.primaryPValue[cohort.rule.finalTest.method]} value={pValue(cohort.rule.finalTest.pValue)} hint={`α = ${cohort.rule.finalTest.alpha}; ${VERDICT_FIGURE_LABELS.primaryHint}`} />
            )}
            {cohort.rule?.finalTest?.sensitivity && <Figure label={VERDICT_FIGURE_LABELS.sensitivity} value={pValue(cohort.rule.finalTest.sensitivity.pValue)} hint={VERDICT_FIGURE_LABELS.sensitivityHint} />}
          </>
        )}
      </div>
      {cohort.rule && (
        <div className="grid gap-1 text-sm">
          <p>
            <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">{ruleLabel(cohort.rule, design?.r1 === null)}: </span>
            <span className="font-semibold">
              <Glyphed word={VERDICT_WORDS[cohort.rule.decision]} />
            </span>
            {cohort.rule.determinedEarly && <span className="text-ink-600"> ({SETTLED_EARLY})</span>}
            {stillOpen(cohort.rule) && <span className="text-ink-600 tabular-nums"> · could still change it: {stillOpen(cohort.rule)}</span>}
          </p>
          <p className="text-ink-700">{cohort.rule.message}</p>
          {cohort.rule.atRiskNote && <p className="text-ink-700">{cohort.rule.atRiskNote}</p>}
          {cohort.rule.sensitivityNote && (
            <p role="note" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-ink-800">
              {cohort.rule.sensitivityNote}
            </p>
          )}
        </div>
      )}
      {cohort.earlyDetermination && (
        <p role="note" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
          <span aria-hidden>{GLYPHS.settledEarly} </span>
          {cohort.earlyDetermination} {cohort.accrual}
        </p>
      )}
      {cohort.notes.length > 0 && (
        <ul className="list-disc pl-5 text-xs text-ink-600">
          {cohort.notes.map((note) => (
            <li key={note}>{note}</li>
          ))}
        </ul>
      )}
      {!cohort.responseHidden && design && (
        <Suspense fallback={<Loading label="Loading the chart" />}>
          <EvaluationChart cohort={cohort} />
        </Suspense>
      )}
    </section>
  );
}

export function EvaluationPanel({ trialId }: { trialId: string }) {
  const { data, isPending, error } = useEvaluation(trialId);
  if (isPending) return <Loading label="Evaluating the cohorts" />;
  if (error) return <ErrorNotice error={error} title="The evaluation could not be loaded" />;
  const rates = data.cohorts
    .filter((c) => c.design && c.rate)
    .map((c) => ({ label: c.cohortCode, estimate: c.rate?.estimate ?? null, ci: c.rate?.ci ?? null, p0: c.design?.p0 ?? 0, p1: c.design?.p1 ?? 0 }));
  return (
    <Panel title="Live evaluation">
      <div className="grid gap-4">
        {data.cohorts.map((cohort) => (
          <CohortBlock key={cohort.cohortId} cohort={cohort} confLevel={data.confLevel} />
        ))}
        {rates.length > 0 && (
          <Suspense fallback={<Loading label="Loading the chart" />}>
            <RateChart rows={rates} title="Response rate with its exact interval against p0 and p1" />
          </Suspense>
        )}
        <Cautions items={data.cautions} />
      </div>
    </Panel>
  );
}
