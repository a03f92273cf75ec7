/**
 * The two charts of a design comparison, loaded on demand (Chart.js stays out of the initial
 * bundle): the probability of declaring the treatment promising, and the expected sample size,
 * against the true response rate, with p0 and p1 marked by vertical lines.
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

type Measure = 'probPromising' | 'expectedN';

function OneChart({ series, measure, p0, p1, title, description }: { series: Series[]; measure: Measure; p0: number; p1: number; title: string; description: string }) {
  const plugins = useMemo(() => [rateMarkers([{ value: p0, label: `p0 ${p0}` }, { value: p1, label: `p1 ${p1}` }])], [p0, p1]);
  const data = useMemo(
    () => ({
      datasets: series.map((s, i) => {
        const style = STYLES[i % STYLES.length];
        return {
          label: s.label,
          data: s.curve.map((point) => ({ x: point.p, y: point[measure] })),
          borderColor: style.color,
          backgroundColor: style.color,
          borderDash: [...style.dash],
          borderWidth: 1.75,
          pointStyle: style.point,
          pointRadius: s.curve.map((point) => (Math.round(point.p * 100) % 10 === 0 ? 3 : 0)),
          tension: 0,
        };
      }),
    }),
    [series, measure],
  );
  const options = useMemo<ChartOptions<'line'>>(
    () => ({
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      parsing: false,
      interaction: { mode: 'nearest', axis: 'x', intersect: false },
      scales: {
        x: { type: 'linear', min: 0, max: Math.max(...series.flatMap((s) => s.curve.map((point) => point.p))), title: { display: true, text: 'True response rate' } },
        y: measure === 'probPromising' ? { min: 0, max: 1, title: { display: true, text: 'Probability' } } : { min: 0, title: { display: true, text: 'Patients' } },
      },
      plugins: {
        legend: { position: 'bottom', labels: { usePointStyle: true, boxWidth: 10, font: { size: 11 } } },
        tooltip: {
          callbacks: {
            title: (items) => `True rate ${Number(items[0]?.parsed.x).toFixed(2)}`,
            label: (item) => `${item.dataset.label}: ${measure === 'probPromising' ? Number(item.parsed.y).toFixed(3) : Number(item.parsed.y).toFixed(1)}`,
          },
        },
      },
    }),
    [series, measure],
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

export default function DesignCharts({ series, p0, p1 }: { series: Series[]; p0: number; p1: number }) {
  const names = series.map((s) => s.label).join(', ');
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <OneChart
        series={series}
        measure="probPromising"
        p0={p0}
        p1={p1}
        title="Probability of declaring the treatment promising"
        description={`Probability of a promising result against the true response rate for ${names}; p0 ${p0} and p1 ${p1} marked.`}
      />
      <OneChart
        series={series}
        measure="expectedN"
        p0={p0}
        p1={p1}
        title="Expected sample size"
        description={`Expected number of patients against the true response rate for ${names}; p0 ${p0} and p1 ${p1} marked.`}
      />
    </div>
  );
}
