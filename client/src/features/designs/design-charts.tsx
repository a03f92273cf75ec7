/**
 * The charts of the Designs page, loaded on demand (Chart.js stays out of the initial bundle): a
 * line figure over a true rate with its reference rates marked, and the two charts of a design
 * comparison built on it — the probability of declaring the treatment promising and the expected
 * sample size against the true response rate, with p0 and p1 marked.
 */
import { useMemo } from 'react';
import { Legend, LinearScale, LineController, LineElement, PointElement, Tooltip, type ChartOptions, type Plugin } from 'chart.js';
import { registerChart } from '../../components/chart-setup';
import { Line } from 'react-chartjs-2';
import type { OperatingPoint } from './types';

registerChart(LineController, LineElement, PointElement, LinearScale, Tooltip, Legend);

export type Series = { label: string; curve: OperatingPoint[] };

/** Line colour and dash and point shape together, so no line is told apart by colour alone. */
const STYLES = [
  { color: '#14213d', dash: [] as number[], point: 'circle' },
  { color: '#b08d3c', dash: [7, 4], point: 'rect' },
  { color: '#4a5570', dash: [2, 3], point: 'triangle' },
  { color: '#8f7130', dash: [12, 3, 2, 3], point: 'rectRot' },
  { color: '#6b7690', dash: [4, 2], point: 'crossRot' },
  { color: '#243050', dash: [1, 4], point: 'star' },
] as const;

/** Draws a labelled vertical line at each marked rate (p0, p1) over the plotted data. */
function rateMarkers(marks: Array<{ value: number; label: string }>): Plugin<'line'> {
  return {
    id: 'rateMarkers',
    afterDatasetsDraw(chart) {
      const { ctx, chartArea, scales } = chart;
      ctx.save();
      for (const mark of marks) {
        const x = scales.x.getPixelForValue(mark.value);
        if (x < chartArea.left || x > chartArea.right) continue;
        ctx.strokeStyle = '#9b2c2c';
        ctx.lineWidth = 1;
        ctx.setLineDash([3, 3]);
        ctx.beginPath();
        ctx.moveTo(x, chartArea.top);
        ctx.lineTo(x, chartArea.bottom);
        ctx.stroke();
        ctx.setLineDash([]);
        ctx.fillStyle = '#9b2c2c';
        ctx.font = '600 11px Inter Variable, sans-serif';
        ctx.fillText(mark.label, x + 4, chartArea.top + 12);
      }
      ctx.restore();
    },
  };
}

/** One line of a chart: its points, and its label in the legend. */
export type ChartLine = { label: string; points: Array<{ x: number; y: number }> };

type FigureProps = {
  lines: ChartLine[];
  title: string;
  description: string;
  xLabel: string;
  /** 'probability' fixes the axis to 0–1 and reads three decimals; 'count' starts at 0 and reads one. */
  y: { label: string; kind: 'probability' | 'count' };
  marks: Array<{ value: number; label: string }>;
  /** Every point at a multiple of this x is drawn as a mark (the line's shape tells lines apart besides colour). */
  markEvery?: number;
};

/** A titled line chart over a rate, with reference lines at the marked rates. */
export function LineFigure({ lines, title, description, xLabel, y, marks, markEvery = 0.1 }: FigureProps) {
  const plugins = useMemo(() => [rateMarkers(marks)], [marks]);
  const data = useMemo(
    () => ({
      datasets: lines.map((line, i) => {
        const style = STYLES[i % STYLES.length];
        return {
          label: line.label,
          data: line.points,
          borderColor: style.color,
          backgroundColor: style.color,
          borderDash: [...style.dash],
          borderWidth: 1.75,
          pointStyle: style.point,
          pointRadius: line.points.map((point) => (Math.abs(point.x / markEvery - Math.round(point.x / markEvery)) < 1e-9 ? 3 : 0)),
          tension: 0,
        };
      }),
    }),
    [lines, markEvery],
  );
  const options = useMemo<ChartOptions<'line'>>(
    () => ({
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      parsing: false,
      interaction: { mode: 'nearest', axis: 'x', intersect: false },
      scales: {
        x: { type: 'linear', min: 0, max: Math.max(...lines.flatMap((line) => line.points.map((point) => point.x))), title: { display: true, text: xLabel } },
        y: y.kind === 'probability' ? { min: 0, max: 1, title: { display: true, text: y.label } } : { min: 0, title: { display: true, text: y.label } },
      },
      plugins: {
        legend: { position: 'bottom', labels: { usePointStyle: true, boxWidth: 10, font: { size: 11 } } },
        tooltip: {
          callbacks: {
            title: (items) => `${xLabel} ${Number(items[0]?.parsed.x).toFixed(2)}`,
            label: (item) => `${item.dataset.label}: ${y.kind === 'probability' ? Number(item.parsed.y).toFixed(3) : Number(item.parsed.y).toFixed(1)}`,
          },
        },
      },
    }),
    [lines, xLabel, y],
  );
  return (
    <figure className="flex flex-col gap-1">
      <figcaption className="text-xs font-semibold tracking-wide text-ink-700 uppercase">{title}</figcaption>
      <div className="h-64">
        <Line data={data} options={options} plugins={plugins} role="img" aria-label={description} />
      </div>
    </figure>
  );
}

const curveLines = (series: Series[], measure: 'probPromising' | 'expectedN'): ChartLine[] =>
  series.map((s) => ({ label: s.label, points: s.curve.map((point) => ({ x: point.p, y: point[measure] })) }));

export default function DesignCharts({ series, p0, p1 }: { series: Series[]; p0: number; p1: number }) {
  const names = series.map((s) => s.label).join(', ');
  const marks = useMemo(() => [{ value: p0, label: `p0 ${p0}` }, { value: p1, label: `p1 ${p1}` }], [p0, p1]);
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <LineFigure
        lines={curveLines(series, 'probPromising')}
        marks={marks}
        xLabel="True response rate"
        y={{ label: 'Probability', kind: 'probability' }}
        title="Probability of declaring the treatment promising"
        description={`Probability of a promising result against the true response rate for ${names}; p0 ${p0} and p1 ${p1} marked.`}
      />
      <LineFigure
        lines={curveLines(series, 'expectedN')}
        marks={marks}
        xLabel="True response rate"
        y={{ label: 'Patients', kind: 'count' }}
        title="Expected sample size"
        description={`Expected number of patients against the true response rate for ${names}; p0 ${p0} and p1 ${p1} marked.`}
      />
    </div>
  );
}
