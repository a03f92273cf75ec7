/**
 * The safety rule's charts, loaded on demand: the continuous toxicity boundary's probability of
 * stopping and its expected patients and toxicities against the true toxicity rate (θ marked), and
 * a Bryant–Day design's probability of a promising result against the true response rate, one line
 * per true toxicity rate (pR0 and pR1 marked).
 */
import { useMemo } from 'react';
import { LineFigure, type ChartLine } from './design-charts';
import type { BryantDayGrid, ToxicityOperatingPoint } from './types';

export function BoundaryCharts({ curve, theta }: { curve: ToxicityOperatingPoint[]; theta: number }) {
  const marks = useMemo(() => [{ value: theta, label: `θ ${theta}` }], [theta]);
  const line = (label: string, pick: (point: ToxicityOperatingPoint) => number): ChartLine => ({ label, points: curve.map((point) => ({ x: point.p, y: pick(point) })) });
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <LineFigure
        lines={[line('Probability of stopping', (point) => point.probStop)]}
        marks={marks}
        xLabel="True toxicity rate"
        y={{ label: 'Probability', kind: 'probability' }}
        title="Probability the boundary stops the cohort"
        description={`Probability of stopping for toxicity against the true toxicity rate; θ ${theta} marked.`}
      />
      <LineFigure
        lines={[line('Expected patients treated', (point) => point.expectedTreated), line('Expected toxicities', (point) => point.expectedToxicities)]}
        marks={marks}
        xLabel="True toxicity rate"
        y={{ label: 'Patients', kind: 'count' }}
        title="Expected patients treated and toxicities"
        description={`Expected patients treated and expected toxicities among them against the true toxicity rate; θ ${theta} marked.`}
      />
    </div>
  );
}

export function JointGridChart({ grid, pR0, pR1 }: { grid: BryantDayGrid; pR0: number; pR1: number }) {
  const marks = useMemo(() => [{ value: pR0, label: `pR0 ${pR0}` }, { value: pR1, label: `pR1 ${pR1}` }], [pR0, pR1]);
  const lines = grid.toxicityRates.map((pT, i) => ({
    label: `Toxicity rate ${pT}`,
    points: grid.responseRates.map((pR, j) => ({ x: pR, y: grid.probPromising[i][j] })),
  }));
  return (
    <LineFigure
      lines={lines}
      marks={marks}
      xLabel="True response rate"
      y={{ label: 'Probability', kind: 'probability' }}
      title="Probability of a promising result, by true toxicity rate"
      description={`Probability of a promising result against the true response rate, one line for each true toxicity rate (${grid.toxicityRates.join(', ')}); pR0 ${pR0} and pR1 ${pR1} marked.`}
    />
  );
}
