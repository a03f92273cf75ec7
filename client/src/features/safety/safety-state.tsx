/**
 * The live safety state of each cohort: toxicities among assessable patients with the exact
 * interval, where the cohort stands against its boundary or its Bryant–Day stage-1 limit and how far
 * it is, the protocol's definition in a sentence, and the cautions. The server sends each member
 * what the visibility rule lets them see: live figures, or why they are absent, and the safety part
 * of a released data cut under its date.
 */
import { Cautions, ErrorNotice, Figure, Loading, Panel, SafetyPauseTag, StatusTag } from '../../components/ui';
import { percent } from '../../lib/format';
import { GLYPHS, SAFETY_RULE_WORDS } from '../../../../server/words';
import { useSafety } from './get-safety';
import type { CohortSafety, VisibleCohortSafety } from './types';

function RuleFigures({ state }: { state: CohortSafety['state'] }) {
  if (!state) return null;
  if (state.rule === 'bryant_day') {
    return (
      <>
        <Figure label="Stage-1 toxicities" value={`${state.stage1Toxicities} / ${state.stage1Assessable}`} hint={`stops with more than t1 = ${state.t1} of n1 = ${state.n1}`} />
        <Figure label="To the stage-1 limit" value={state.crossed ? 'Crossed' : state.toStage1Limit} hint={state.crossed ? 'accrual pauses' : 'more toxicities would cross it'} />
        <Figure label="Final toxicity rule" value={`≤ ${state.t} of ${state.n}`} hint={state.finalLimitExceeded ? 'can no longer be met' : `${state.toxicities} so far`} />
      </>
    );
  }
  return (
    <>
      <Figure label="Boundary here" value={state.bound ?? '—'} hint={state.bound === null ? 'no stop possible yet' : `b at ${Math.min(state.assessable, state.n)} assessable`} />
      <Figure
        label="To the boundary"
        value={state.crossed ? 'Reached' : (state.toNextStop ?? '—')}
        hint={state.crossed ? 'accrual pauses' : state.toNextStop === null ? `cannot be reached within n = ${state.n}` : 'more toxicities in a row'}
      />
    </>
  );
}

function Figures({ counts, rate, state }: Pick<CohortSafety, 'counts' | 'rate' | 'state'>) {
  if (!counts) return null;
  return (
    <div className="flex flex-wrap gap-6">
      <Figure label="Toxicities" value={`${counts.toxic} / ${counts.toxic + counts.notToxic}`} hint={`assessable · ${counts.notAssessable} not yet`} />
      <Figure
        label="Toxicity rate"
        value={rate ? percent(rate.estimate) : '—'}
        hint={rate ? `${Math.round(rate.confLevel * 100)}% exact CI ${percent(rate.ci[0])} – ${percent(rate.ci[1])}` : 'No assessable patient yet'}
      />
      <RuleFigures state={state} />
    </div>
  );
}

/** The safety part of the released cut, under the cut's date: it does not move with later events. */
function ReleasedSafety({ released }: { released: NonNullable<VisibleCohortSafety['released']> }) {
  return (
    <section aria-label={`Released safety figures, ${released.label}`} className="grid gap-2 border-l-4 border-ink-300 pl-3">
      <h4 className="text-xs font-semibold tracking-wide text-ink-600 uppercase">
        <span aria-hidden>{GLYPHS.released} </span>Released safety figures, {released.label}
      </h4>
      <Figures counts={released.counts} rate={released.toxicityRate} state={released.state} />
      <ul className="list-disc pl-5 text-sm text-ink-700">
        {released.sentences.map((sentence) => (
          <li key={sentence}>{sentence}</li>
        ))}
      </ul>
    </section>
  );
}

export function CohortSafetyBlock({ cohort }: { cohort: VisibleCohortSafety }) {
  return (
    <section aria-label={`Safety of cohort ${cohort.cohortCode}`} className="grid gap-3 border-t border-ink-100 pt-3 first:border-0 first:pt-0">
      <div className="flex flex-wrap items-center gap-2">
        <h3 className="text-sm font-semibold text-ink-900">
          <span className="font-mono text-xs text-ink-500">{cohort.cohortCode}</span> {cohort.cohortName}
        </h3>
        <StatusTag status={cohort.status} />
        {cohort.safetyPause && <SafetyPauseTag />}
        {cohort.lockedRule && <span className="text-xs text-ink-500">{SAFETY_RULE_WORDS[cohort.lockedRule.safetyRule]} · design v{cohort.lockedRule.version}</span>}
      </div>
      <Figures counts={cohort.counts ?? null} rate={cohort.rate ?? null} state={cohort.state ?? null} />
      {cohort.efficacyHidden && (
        <p role="note" className="text-sm text-ink-600">
          <span aria-hidden>{GLYPHS.withheld} </span>
          {cohort.efficacyHidden}
        </p>
      )}
      {cohort.safetyPause && (
        <p role="note" className="border-l-4 border-alert-600 bg-alert-50 px-3 py-2 text-sm text-ink-800">
          <span aria-hidden>{GLYPHS.paused} </span>
          {cohort.safetyPause.reason} Enrolment resumes only when the statistician applies the committee’s decision on a data cut.
        </p>
      )}
      {cohort.definition && <p className="text-sm text-ink-700">{cohort.definition}</p>}
      {cohort.sentences && (
        <ul className="list-disc pl-5 text-sm text-ink-700">
          {cohort.sentences.map((sentence) => (
            <li key={sentence}>{sentence}</li>
          ))}
        </ul>
      )}
      {cohort.counts && cohort.counts.awaitingAssessment > 0 && (
        <p className="text-xs text-ink-600">
          {cohort.counts.awaitingAssessment} patient{cohort.counts.awaitingAssessment === 1 ? ' has' : 's have'} an event in the window that still needs its grade or attribution.
        </p>
      )}
      {cohort.released && <ReleasedSafety released={cohort.released} />}
    </section>
  );
}

export function SafetyOverview({ trialId }: { trialId: string }) {
  const { data, isPending, error } = useSafety(trialId);
  if (isPending) return <Loading label="Counting toxicities" />;
  if (error) return <ErrorNotice error={error} title="The safety state could not be loaded" />;
  return (
    <Panel title="Live safety">
      <div className="grid gap-4">
        {data.cohorts.map((cohort) => (
          <CohortSafetyBlock key={cohort.cohortId} cohort={cohort} />
        ))}
        <Cautions items={data.cautions} />
      </div>
    </Panel>
  );
}
