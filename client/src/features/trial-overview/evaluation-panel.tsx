/**
 * The evaluation of each cohort on the Trial overview, as the server's visibility rule lets this
 * user see it: the live figures (counts, the response rate with its exact interval, the one-sided
 * exact test against p0, the cohort's verdict under its locked design with early determination,
 * patients enrolled at risk, what could still change it (said once, in the verdict's sentence),
 * and at a final analysis the p-value it follows with its sensitivity figure), or the reason they
 * are absent; the figures of the data cut a committee decision released, labelled with the cut's
 * date; and site staff's own sites' counts.
 * Charts load on demand.
 */
import { Suspense, lazy } from 'react';
import { Cautions, ErrorNotice, Figure, Glyphed, Loading, Panel, StatusTag } from '../../components/ui';
import { decimal, percent, pValue } from '../../lib/format';
import { COUNT_LABELS, GLYPHS, POPULATION_COUNTS, SETTLED_EARLY, VERDICT_FIGURE_LABELS, VERDICT_WORDS, plural, ruleLabel } from '../../../../server/words';
import type { CohortVerdict } from '../../../../server/evaluation/verdict';
import { liveOf, useEvaluation, type CohortView, type LiveCohort } from './get-evaluation';

const EvaluationChart = lazy(() => import('./evaluation-chart').then((m) => ({ default: m.EvaluationChart })));
const RateChart = lazy(() => import('../../components/rate-chart').then((m) => ({ default: m.RateChart })));

function RuleLine({ rule, singleStage }: { rule: CohortVerdict; singleStage: boolean }) {
  return (
    <div className="grid gap-1 text-sm">
      <p>
        <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">{ruleLabel(rule, singleStage)}: </span>
        <span className="font-semibold">
          <Glyphed word={VERDICT_WORDS[rule.decision]} />
        </span>
        {rule.determinedEarly && <span className="text-ink-600"> ({SETTLED_EARLY})</span>}
      </p>
      <p className="text-ink-700">{rule.message}</p>
      {rule.atRiskNote && <p className="text-ink-700">{rule.atRiskNote}</p>}
      {rule.sensitivityNote && (
        <p role="note" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-ink-800">
          {rule.sensitivityNote}
        </p>
      )}
    </div>
  );
}

function LiveFigures({ cohort, confLevel }: { cohort: LiveCohort; confLevel: number }) {
  const rule = cohort.rule;
  return (
    <>
      <div className="flex flex-wrap gap-6">
        <Figure label="Responders / decided" value={`${cohort.responders} / ${cohort.decided}`} hint={`${cohort.pending} pending · ${cohort.notEvaluable} not evaluable`} />
        <Figure
          label="Response rate"
          value={cohort.rate ? percent(cohort.rate.estimate) : '—'}
          hint={cohort.rate ? `${Math.round(confLevel * 100)}% exact CI ${percent(cohort.rate.ci[0])} – ${percent(cohort.rate.ci[1])}` : 'No outcome yet'}
        />
        <Figure label="One-sided p vs p0" value={cohort.test ? pValue(cohort.test.pValue) : '—'} hint={cohort.test ? `exact binomial, H0: p ≤ ${decimal(cohort.test.p0, 2)}` : undefined} />
        {rule && rule.atRisk > 0 && <Figure label={VERDICT_FIGURE_LABELS.atRisk} value={rule.atRisk} hint={VERDICT_FIGURE_LABELS.atRiskHint} />}
        {rule?.finalTest && rule.applied === 'final' && (
          <Figure label={VERDICT_FIGURE_LABELS.primaryPValue[rule.finalTest.method]} value={pValue(rule.finalTest.pValue)} hint={`α = ${rule.finalTest.alpha}; ${VERDICT_FIGURE_LABELS.primaryHint}`} />
        )}
        {rule?.finalTest?.sensitivity && <Figure label={VERDICT_FIGURE_LABELS.sensitivity} value={pValue(rule.finalTest.sensitivity.pValue)} hint={VERDICT_FIGURE_LABELS.sensitivityHint} />}
      </div>
      {rule && <RuleLine rule={rule} singleStage={cohort.design?.r1 === null} />}
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
      {cohort.design && (
        <Suspense fallback={<Loading label="Loading the chart" />}>
          <EvaluationChart cohort={cohort} />
        </Suspense>
      )}
    </>
  );
}
/** The frozen figures of the released cut, under the cut's date: they do not move with later outcomes. */
function ReleasedFigures({ released, singleStage }: { released: NonNullable<CohortView['released']>; singleStage: boolean }) {
  const rate = released.responseRate;
  return (
    <section aria-label={`Released figures, ${released.label}`} className="grid gap-2 border-l-4 border-ink-300 pl-3">
      <h4 className="text-xs font-semibold tracking-wide text-ink-600 uppercase">
        <span aria-hidden>{GLYPHS.released} </span>Released figures, {released.label}
      </h4>
      <div className="flex flex-wrap gap-6">
        <Figure label="Responders" value={`${released.counts.responders} / ${released.counts.decided}`} hint={`${released.counts.pending} pending at the cut`} />
        <Figure
          label="Response rate"
          value={rate ? percent(rate.estimate) : '—'}
          hint={rate ? `${Math.round(rate.confLevel * 100)}% exact CI ${percent(rate.clopperPearson[0])} – ${percent(rate.clopperPearson[1])}` : 'No outcome at the cut'}
        />
        <Figure label="One-sided p vs p0" value={released.exactTest ? pValue(released.exactTest.pValue) : '—'} hint={released.exactTest ? `exact binomial, H0: p ≤ ${decimal(released.exactTest.p0, 2)}` : undefined} />
      </div>
      {released.rule && <RuleLine rule={released.rule} singleStage={singleStage} />}
    </section>
  );
}

/** Site staff's own sites, live: counts only, never a rate or a test across the trial. */
function OwnSites({ sites }: { sites: NonNullable<CohortView['ownSites']> }) {
  return (
    <section aria-label="Your sites" className="grid gap-1 text-sm">
      <h4 className="text-xs font-semibold tracking-wide text-ink-600 uppercase">Your sites, live</h4>
      {sites.length === 0 ? (
        <p className="text-ink-600">No patient enrolled at your sites yet.</p>
      ) : (
        <ul className="grid gap-0.5 tabular-nums">
          {sites.map((site) => (
            <li key={site.siteId}>
              <span className="font-mono text-xs text-ink-500">{site.siteCode}</span> {plural(site.responders, 'responder')} among {plural(site.decided, 'patient')} with an outcome ·{' '}
              {site.pending} pending · {site.enrolled} enrolled
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function CohortBlock({ cohort, confLevel }: { cohort: CohortView; confLevel: number }) {
  const design = cohort.design;
  const live = liveOf(cohort);
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
        {!live && <Figure label={COUNT_LABELS.decided} value={cohort.decided} hint={`${cohort.pending} pending · ${cohort.notEvaluable} not evaluable`} />}
      </div>
      {live ? (
        <LiveFigures cohort={live} confLevel={confLevel} />
      ) : (
        <p role="note" className="text-sm text-ink-600">
          <span aria-hidden>{GLYPHS.withheld} </span>
          {cohort.efficacyHidden}
        </p>
      )}
      {cohort.ownSites && <OwnSites sites={cohort.ownSites} />}
      {cohort.released && <ReleasedFigures released={cohort.released} singleStage={design?.r1 === null} />}
    </section>
  );
}

export function EvaluationPanel({ trialId }: { trialId: string }) {
  const { data, isPending, error } = useEvaluation(trialId);
  if (isPending) return <Loading label="Evaluating the cohorts" />;
  if (error) return <ErrorNotice error={error} title="The evaluation could not be loaded" />;
  const rates = data.cohorts
    .map(liveOf)
    .filter((c): c is LiveCohort => !!c?.design && !!c.rate)
    .map((c) => ({ label: c.cohortCode, estimate: c.rate?.estimate ?? null, ci: c.rate?.ci ?? null, p0: c.design?.p0 ?? 0, p1: c.design?.p1 ?? 0 }));
  return (
    <Panel title="Evaluation">
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
