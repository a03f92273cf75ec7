/**
 * The continuous toxicity boundary for the compared response designs: pick the design whose n the
 * boundary watches, read its bounds, its nominal level and exact chance of stopping at θ, and its
 * operating characteristics over the true toxicity rate.
 */
import { lazy, Suspense, useState } from 'react';
import { ErrorNotice, Figure, Loading, Spinner } from '../../components/ui';
import { decimal } from '../../lib/format';
import { useToxicityBoundary } from './get-toxicity-boundary';
import { BoundaryCharacteristicsTable, BoundaryTable, characteristicRates } from './boundary-table';
import { ruleText, type CandidateDesign } from './types';

const BoundaryCharts = lazy(() => import('./safety-charts').then((m) => ({ default: m.BoundaryCharts })));

export function BoundaryPanel({ trialId, candidates, theta, alpha }: { trialId: string; candidates: CandidateDesign[]; theta: number; alpha: number }) {
  const [key, setKey] = useState(candidates[0]?.key ?? '');
  const chosen = candidates.find((c) => c.key === key) ?? candidates[0];
  const boundary = useToxicityBoundary(trialId, { n: chosen.n, theta, alpha });
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-4">
        <label className="flex flex-col gap-1 text-sm">
          <span className="text-xs font-semibold tracking-wide text-ink-700 uppercase">Boundary over the n of</span>
          <select value={chosen.key} onChange={(e) => setKey(e.target.value)} className="rounded-sm border border-ink-300 px-2 py-1.5">
            {candidates.map((c) => (
              <option key={c.key} value={c.key}>
                {c.label} {ruleText(c)} (n = {c.n})
              </option>
            ))}
          </select>
        </label>
        {boundary.isFetching && <Spinner label="Computing the boundary" />}
      </div>
      {boundary.error ? (
        <ErrorNotice error={boundary.error} title="No boundary for these settings" />
      ) : !boundary.data ? (
        <Loading label="Computing the boundary" />
      ) : (
        <>
          <div className="flex flex-wrap gap-6">
            <Figure label="θ / α" value={`${theta} / ${alpha}`} hint={`over n = ${chosen.n} patients`} />
            <Figure label="Nominal level" value={decimal(boundary.data.nominalLevel, 4)} hint="the same at every k (Pocock type)" />
            <Figure label="P(stop) at θ" value={decimal(boundary.data.crossingProbability, 4)} hint={`exact; at most α ${alpha}`} />
          </div>
          <div className="overflow-x-auto">
            <BoundaryTable bounds={boundary.data.bounds} />
          </div>
          <BoundaryCharacteristicsTable curve={boundary.data.curve} rates={characteristicRates(theta)} />
          <Suspense fallback={<Loading label="Loading charts" />}>
            <BoundaryCharts curve={boundary.data.curve} theta={theta} />
          </Suspense>
        </>
      )}
    </div>
  );
}
