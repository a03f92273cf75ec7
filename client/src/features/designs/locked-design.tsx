/** The design in force for a cohort: its rule, its exact figures, its protocol settings, its safety rule and its charts. */
import { lazy, Suspense } from 'react';
import { Figure, Loading } from '../../components/ui';
import { dateTime, decimal } from '../../lib/format';
import { SAFETY_RULE_WORDS, toxicityDefinitionSentence } from '../../../../server/words';
import { BoundaryCharacteristicsTable, BoundaryTable, characteristicRates } from './boundary-table';
import { designLabel, ruleText, type CohortDesigns, type DesignVersion } from './types';

const DesignCharts = lazy(() => import('./design-charts'));
const BoundaryCharts = lazy(() => import('./safety-charts').then((m) => ({ default: m.BoundaryCharts })));

function SafetyRule({ cohort, design }: { cohort: CohortDesigns; design: DesignVersion }) {
  if (design.safetyRule === 'none' || !design.toxicity) {
    return <p className="text-sm text-ink-600">Safety rule: {SAFETY_RULE_WORDS.none.toLowerCase()}. Adverse events are recorded; no toxicity rule pauses accrual.</p>;
  }
  return (
    <section aria-label="Safety rule" className="grid gap-3 border-t border-ink-100 pt-3">
      <h3 className="text-sm font-semibold tracking-wide text-ink-900 uppercase">Safety rule: {SAFETY_RULE_WORDS[design.safetyRule]}</h3>
      <p className="text-sm">{toxicityDefinitionSentence(design.toxicity)}</p>
      {design.boundary && (
        <>
          <div className="flex flex-wrap gap-6">
            <Figure label="θ / α" value={`${design.boundary.theta} / ${design.boundary.alpha}`} hint={`over n = ${design.boundary.bounds.length}`} />
            <Figure label="Nominal level" value={decimal(design.boundary.nominalLevel, 4)} />
            <Figure label="P(stop) at θ" value={decimal(design.boundary.crossingProbability, 4)} hint="exact" />
          </div>
          <div className="overflow-x-auto">
            <BoundaryTable bounds={design.boundary.bounds} />
          </div>
          {cohort.currentBoundaryCurve && (
            <>
              <BoundaryCharacteristicsTable curve={cohort.currentBoundaryCurve} rates={characteristicRates(design.boundary.theta)} />
              <Suspense fallback={<Loading label="Loading charts" />}>
                <BoundaryCharts curve={cohort.currentBoundaryCurve} theta={design.boundary.theta} />
              </Suspense>
            </>
          )}
        </>
      )}
      {design.bryantDay && (
        <div className="flex flex-wrap gap-6">
          <Figure label="Stage-1 toxicity limit" value={`${design.bryantDay.t1} / ${design.n1}`} hint="stops with more than t1" />
          <Figure label="Final toxicity limit" value={`${design.bryantDay.t} / ${design.n}`} hint="promising only with at most t" />
          <Figure label="Toxicity rates" value={`${design.bryantDay.toxAcceptable} / ${design.bryantDay.toxUnacceptable}`} hint="acceptable / unacceptable" />
          <Figure label="αT" value={decimal(design.bryantDay.attainedAlphaT, 4)} hint={`at most ${design.bryantDay.alphaT}`} />
          <Figure label="EN high toxicity" value={decimal(design.bryantDay.expectedNHighToxicity, 1)} />
        </div>
      )}
    </section>
  );
}

export function LockedDesign({ cohort, design }: { cohort: CohortDesigns; design: DesignVersion }) {
  return (
    <div className="grid gap-4">
      <p className="text-sm">
        <strong>Version {design.version}</strong>, {designLabel(design)} design for protocol {design.protocolReference ?? '—'}
        {design.signature && (
          <>
            , signed by {design.signature.signerName ?? design.signature.signerEmail} on {dateTime(design.signature.signedAt)}
          </>
        )}
        .
      </p>
      <div className="flex flex-wrap gap-6">
        {design.n1 !== null && <Figure label="Stage 1 r1/n1" value={`${design.r1}/${design.n1}`} hint="stop when r1 or fewer respond" />}
        <Figure label="Total r/n" value={`${design.r}/${design.n}`} hint="promising when more than r respond" />
        <Figure label="p0 / p1" value={`${design.p0} / ${design.p1}`} />
        <Figure label="Type I error" value={decimal(design.typeIError, 4)} hint={`α ${design.alpha}`} />
        <Figure label="Power" value={decimal(design.power, 4)} hint={`1 − β ${+(1 - design.beta).toFixed(4)}`} />
        {design.en0 !== null && <Figure label="EN0" value={decimal(design.en0, 1)} />}
        {design.pet0 !== null && design.n1 !== null && <Figure label="PET0" value={decimal(design.pet0, 2)} />}
      </div>
      <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1 text-sm">
        <dt className="text-ink-500">Analysis population</dt>
        <dd>{design.analysisPopulation === 'all_enrolled' ? 'All enrolled' : 'Evaluable (non-evaluable patients replaced)'}</dd>
        <dt className="text-ink-500">Accrual at the interim</dt>
        <dd>{design.interimAccrual === 'pause' ? 'Pauses for the interim review' : 'Continues at risk'}</dd>
        <dt className="text-ink-500">Sponsors see response figures</dt>
        <dd>{design.sponsorSeesResponse ? 'Yes' : 'Only after the committee releases them'}</dd>
        <dt className="text-ink-500">Patients enrolled</dt>
        <dd className="tabular-nums">{cohort.enrolled}</dd>
      </dl>
      {cohort.currentCurve && (
        <Suspense fallback={<Loading label="Loading charts" />}>
          <DesignCharts series={[{ label: `Version ${design.version}: ${ruleText(design)}`, curve: cohort.currentCurve }]} p0={design.p0} p1={design.p1} />
        </Suspense>
      )}
      <SafetyRule cohort={cohort} design={design} />
    </div>
  );
}
