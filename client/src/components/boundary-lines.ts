/**
 * The stopping boundaries as chart lines, shared by the live chart and the data cut's chart. In stage
 * 1 the upper line only passes the stage (more than r1 responders): it is not the promising boundary,
 * which belongs to the final analysis (more than r). The futility boundary is drawn stage by stage:
 * a gap separates stage 1 from the final boundary, so no line joins them across the interim.
 */
import type { ChartDataset } from 'chart.js';
import { CHART_COLOURS } from './chart-colours';

/** For k decided patients: at or below `futility` the rule of the current stage is met, at or above `upper` it is passed. */
export type BoundaryPoint = { k: number; futility: number | null; upper: number };

type Point = { x: number; y: number };

/** Runs of consecutive points with a value, each starting a step earlier so its first step is drawn. */
function steps(points: Array<{ k: number; value: number | null }>): Point[] {
  const out: Point[] = [];
  let previous: number | null = null;
  for (const { k, value } of points) {
    if (value === null) {
      if (previous !== null) out.push({ x: k - 0.5, y: Number.NaN });
    } else {
      if (previous === null) out.push({ x: k - 1, y: value });
      out.push({ x: k, y: value });
    }
    previous = value;
  }
  return out;
}

const line = (label: string, data: Point[], colour: string, dash: number[]): ChartDataset<'scatter'> => ({
  label,
  data,
  showLine: true,
  stepped: 'before',
  borderColor: colour,
  backgroundColor: colour,
  borderDash: dash,
  pointRadius: 0,
  borderWidth: 2,
});

export function boundaryLines(points: BoundaryPoint[], n1: number | null): ChartDataset<'scatter'>[] {
  const stage1 = n1 === null ? [] : points.filter((p) => p.k <= n1);
  const final = n1 === null ? points : points.filter((p) => p.k > n1);
  const futility = [
    ...steps(stage1.map((p) => ({ k: p.k, value: p.futility }))),
    ...(stage1.length > 0 ? [{ x: (n1 as number) + 0.5, y: Number.NaN }] : []),
    ...steps(final.map((p) => ({ k: p.k, value: p.futility }))),
  ];
  return [
    line('Futility boundary (at or below: the rule is met)', futility, CHART_COLOURS.ink, []),
    ...(stage1.length > 0 ? [line('Stage 1 passed (at or above: more than r1)', steps(stage1.map((p) => ({ k: p.k, value: p.upper }))), CHART_COLOURS.brass, [2, 3])] : []),
    line('Promising (at or above at the final analysis: more than r)', steps(final.map((p) => ({ k: p.k, value: p.upper }))), CHART_COLOURS.brass, [6, 4]),
  ];
}
