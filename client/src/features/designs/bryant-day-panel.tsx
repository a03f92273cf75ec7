/**
 * Bryant–Day candidates: the optimal and minimax designs of the exact search with their attained
 * error levels, power and expected sizes under the two null scenarios; and, for the design looked
 * at, the probability of a promising result over a grid of true response × toxicity rates and the
 * effect of an association between a patient's response and toxicity (odds ratio) at the design's
 * three scenarios.
 */
import { lazy, Suspense, useState } from 'react';
import { Button, ErrorNotice, Loading, Spinner } from '../../components/ui';
import { decimal } from '../../lib/format';
import type { SafetyDesignSettings } from '../../../../server/safety/safety.schema';
import { useBryantDayGrid } from './get-bryant-day-grid';
import type { BryantDayDesign, CandidateDesign } from './types';

const JointGridChart = lazy(() => import('./safety-charts').then((m) => ({ default: m.JointGridChart })));

type Candidate = CandidateDesign & { bryantDay: BryantDayDesign };

function Characteristics({ trialId, design, settings }: { trialId: string; design: BryantDayDesign; settings: SafetyDesignSettings }) {
  const grid = useBryantDayGrid(trialId, {
    n1: design.n1,
    r1: design.r1,
    t1: design.t1,
    n: design.n,
    r: design.r,
    t: design.t,
    pR0: settings.pR0,
    pR1: settings.pR1,
    toxAcceptable: settings.toxAcceptable,
    toxUnacceptable: settings.toxUnacceptable,
  });
  if (grid.error) return <ErrorNotice error={grid.error} title="The characteristics could not be computed" />;
  if (!grid.data) return <Loading label="Computing the characteristics" />;
  return (
    <div className={`grid gap-4 ${grid.isFetching ? 'opacity-60' : ''}`} aria-busy={grid.isFetching}>
      <Suspense fallback={<Loading label="Loading charts" />}>
        <JointGridChart grid={grid.data} pR0={settings.pR0} pR1={settings.pR1} />
      </Suspense>
      <table className="text-sm tabular-nums">
        <caption className="mb-1 text-left text-xs text-ink-500">
          A patient’s response and toxicity may be associated; the design assumes they are not (odds ratio 1). Exact over the four response × toxicity outcomes.
        </caption>
        <thead>
          <tr className="text-left text-xs text-ink-500 uppercase">
            <th scope="col" className="pr-4">Odds ratio</th>
            <th scope="col" className="pr-4">P(promising), poor response</th>
            <th scope="col" className="pr-4">P(promising), high toxicity</th>
            <th scope="col" className="pr-4">Power</th>
            <th scope="col">EN, poor response</th>
          </tr>
        </thead>
        <tbody>
          {grid.data.association.map((row) => (
            <tr key={row.oddsRatio} className={row.oddsRatio === 1 ? 'font-semibold' : undefined}>
              <th scope="row" className="pr-4 text-left">
                {row.oddsRatio}
                {row.oddsRatio === 1 && <span className="font-normal text-ink-500"> (independent)</span>}
              </th>
              <td className="pr-4">{decimal(row.poorResponse, 4)}</td>
              <td className="pr-4">{decimal(row.highToxicity, 4)}</td>
              <td className="pr-4">{decimal(row.power, 4)}</td>
              <td>{decimal(row.expectedNPoorResponse, 1)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

type Props = {
  trialId: string;
  candidates: Candidate[];
  settings: SafetyDesignSettings;
  computing: boolean;
  onChoose?: (candidate: Candidate) => void;
  chooseLabel: string;
};

export function BryantDayPanel({ trialId, candidates, settings, computing, onChoose, chooseLabel }: Props) {
  const [lookedAt, setLookedAt] = useState(candidates[0].key);
  const shown = candidates.find((c) => c.key === lookedAt) ?? candidates[0];
  return (
    <div className="grid gap-5">
      <div className="flex items-center justify-between">
        <p className="text-sm text-ink-600">
          Stage 1 of n1 stops when r1 or fewer respond or more than t1 have a toxicity; the agent is promising when more than r of n respond and no more than t
          have a toxicity (Bryant &amp; Day, 1995).
        </p>
        {computing && <Spinner label="Searching every Bryant–Day design up to nmax" />}
      </div>
      <table className="text-sm tabular-nums">
        <caption className="sr-only">Bryant–Day designs</caption>
        <thead>
          <tr className="text-left text-xs text-ink-500 uppercase">
            <th scope="col" className="pr-3">Design</th>
            <th scope="col" className="pr-3">Stage 1 r1 · t1 / n1</th>
            <th scope="col" className="pr-3">Final r · t / n</th>
            <th scope="col" className="pr-3">αR</th>
            <th scope="col" className="pr-3">αT</th>
            <th scope="col" className="pr-3">Power</th>
            <th scope="col" className="pr-3">EN poor response</th>
            <th scope="col" className="pr-3">EN high toxicity</th>
            <th scope="col" />
          </tr>
        </thead>
        <tbody>
          {candidates.map((c) => (
            <tr key={c.key} className="border-t border-ink-100">
              <th scope="row" className="py-1 pr-3 text-left">
                <label className="inline-flex items-center gap-2 font-semibold">
                  <input type="radio" name="bryant-day-shown" checked={c.key === shown.key} onChange={() => setLookedAt(c.key)} className="accent-ink-900" />
                  {c.label}
                </label>
              </th>
              <td className="pr-3">
                {c.bryantDay.r1} · {c.bryantDay.t1} / {c.bryantDay.n1}
              </td>
              <td className="pr-3">
                {c.bryantDay.r} · {c.bryantDay.t} / {c.bryantDay.n}
              </td>
              <td className="pr-3">{decimal(c.bryantDay.alphaR, 4)}</td>
              <td className="pr-3">{decimal(c.bryantDay.alphaT, 4)}</td>
              <td className="pr-3">{decimal(c.bryantDay.power, 4)}</td>
              <td className="pr-3">{decimal(c.bryantDay.expectedN.poorResponse, 1)}</td>
              <td className="pr-3">{decimal(c.bryantDay.expectedN.highToxicity, 1)}</td>
              <td>
                {onChoose && (
                  <Button variant="secondary" onClick={() => onChoose(c)} aria-label={`${chooseLabel}: ${c.label}`}>
                    {chooseLabel}
                  </Button>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <section aria-label={`Characteristics of the ${shown.label} design`} className="border-t border-ink-100 pt-4">
        <h3 className="mb-2 text-sm font-semibold tracking-wide text-ink-900 uppercase">Characteristics of the {shown.label} design</h3>
        <Characteristics trialId={trialId} design={shown.bryantDay} settings={settings} />
      </section>
    </div>
  );
}
