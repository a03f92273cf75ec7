/**
 * The data cut's charts (Chart.js, loaded on demand): responders against evaluable patients with
 * the stopping boundaries, and response rates with their intervals against p0 and p1. Lines differ
 * by dash and point shape as well as colour, and every chart carries a text summary.
 */
import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  Legend,
  LineController,
  LineElement,
  LinearScale,
  PointElement,
  ScatterController,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import { Chart as ChartView, Scatter } from 'react-chartjs-2';
import type { CohortAnalysis } from './types';

Chart.register(BarController, BarElement, CategoryScale, LineController, LineElement, LinearScale, PointElement, ScatterController, Legend, Tooltip);

const INK = '#14213d';
const BRASS = '#b08d3c';
const SLATE = '#4a5570';
const OBSERVED = '#3a5a8c';

const pct = (v: number) => `${(v * 100).toFixed(1)}%`;

export function BoundaryChart({ cohort }: { cohort: CohortAnalysis }) {
  const design = cohort.design;
  if (!design) return null;
  // NaN leaves a gap: the futility line exists only where the negative outcome can already be settled.
  const futility = cohort.boundaries.map((b) => ({ x: b.evaluable, y: b.futility ?? Number.NaN }));
  const success = cohort.boundaries.map((b) => ({ x: b.evaluable, y: b.success }));
  const last = cohort.path.at(-1);
  const data: ChartData<'scatter'> = {
    datasets: [
      { label: 'Futility boundary (at or below: negative outcome settled)', data: futility, showLine: true, stepped: 'before', borderColor: INK, backgroundColor: INK, pointRadius: 0, borderWidth: 2 },
      { label: 'Success boundary (at or above: positive outcome settled)', data: success, showLine: true, stepped: 'before', borderColor: BRASS, backgroundColor: BRASS, borderDash: [6, 4], pointRadius: 0, borderWidth: 2 },
      { label: 'Observed responders', data: [{ x: 0, y: 0 }, ...cohort.path.map((p) => ({ x: p.evaluable, y: p.responders }))], showLine: true, borderColor: OBSERVED, backgroundColor: OBSERVED, pointStyle: 'rectRot', pointRadius: 3, borderWidth: 1 },
    ],
  };
  const options: ChartOptions<'scatter'> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom', labels: { usePointStyle: true } } },
    scales: {
      x: { min: 0, max: Math.max(design.n, last?.evaluable ?? 0), title: { display: true, text: 'Evaluable patients' }, ticks: { precision: 0 } },
      y: { min: 0, max: design.r + 2, title: { display: true, text: 'Responders' }, ticks: { precision: 0 } },
    },
  };
  const summary = last
    ? `Cohort ${cohort.code}: ${last.responders} responders among ${last.evaluable} evaluable patients. ${design.r1 !== null ? `Stage 1 stops for futility at ${design.r1} or fewer among ${design.n1}; ` : ''}promising above ${design.r} among ${design.n}.`
    : `Cohort ${cohort.code}: no decided outcome yet.`;
  return (
    <div className="h-80">
      <Scatter data={data} options={options} role="img" aria-label={summary} />
    </div>
  );
}

export type RateRow = { label: string; estimate: number | null; ci: [number, number] | null; p0: number; p1: number };

/** Response rate per site or per cohort: exact interval as a bar, the estimate as a point, p0 and p1 as reference lines. */
export function RateChart({ rows, title }: { rows: RateRow[]; title: string }) {
  const shown = rows.filter((r) => r.ci && r.estimate !== null);
  if (shown.length === 0) return null;
  const data: ChartData<'bar' | 'line', Array<number | [number, number] | null>> = {
    labels: shown.map((r) => r.label),
    datasets: [
      { type: 'bar', label: '95% exact interval', data: shown.map((r) => r.ci as [number, number]), backgroundColor: 'rgba(20,33,61,0.25)', borderColor: INK, borderWidth: 1, barPercentage: 0.25 },
      { type: 'line', label: 'Response rate', data: shown.map((r) => r.estimate), showLine: false, pointStyle: 'rectRot', pointRadius: 6, borderColor: INK, backgroundColor: INK },
      // Each group gets its own p0/p1 marks (cohorts differ): a wide horizontal mark across its column.
      { type: 'line', label: 'p0 (null rate)', data: shown.map((r) => r.p0), borderColor: SLATE, backgroundColor: SLATE, showLine: false, pointStyle: 'line', pointRadius: 34, pointHoverRadius: 34, pointBorderWidth: 2 },
      { type: 'line', label: 'p1 (target rate)', data: shown.map((r) => r.p1), borderColor: BRASS, backgroundColor: BRASS, showLine: false, pointStyle: 'line', pointRadius: 34, pointHoverRadius: 34, pointBorderWidth: 4 },
    ],
  };
  const options: ChartOptions<'bar' | 'line'> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom', labels: { usePointStyle: true } } },
    scales: { y: { min: 0, max: 1, title: { display: true, text: 'Response rate' }, ticks: { callback: (v) => `${Math.round(Number(v) * 100)}%` } } },
  };
  const summary = `${title}: ${shown.map((r) => `${r.label} ${pct(r.estimate as number)} (${pct((r.ci as [number, number])[0])} to ${pct((r.ci as [number, number])[1])})`).join('; ')}.`;
  return (
    <div className="h-72">
      <ChartView type="bar" data={data as ChartData<'bar'>} options={options as ChartOptions<'bar'>} role="img" aria-label={summary} />
    </div>
  );
}
