/** The design in force for a cohort: its rule, its exact figures, its protocol settings and its charts. */
import { lazy, Suspense } from 'react';
import { Figure, Loading } from '../../components/ui';
import { dateTime, decimal } from '../../lib/format';
import { ruleText, SELECTION_LABELS, type CohortDesigns, type DesignVersion } from './types';

const DesignCharts = lazy(() => import('./design-charts'));

export function LockedDesign({ cohort, design }: { cohort: CohortDesigns; design: DesignVersion }) {
  return (
    <div className="grid gap-4">
      <p className="text-sm">
        <strong>Version {design.version}</strong>, {SELECTION_LABELS[design.selection]} design for protocol {design.protocolReference ?? '—'}
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
    </div>
  );
}
