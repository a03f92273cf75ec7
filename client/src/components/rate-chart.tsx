/**
 * Response rates with their exact intervals against p0 and p1 (Chart.js, load it on demand), per
 * site or per cohort: the Trial overview and a data cut's analysis both draw it. Marks differ by
 * shape as well as colour, and the chart carries a text summary.
 */
import {
  BarController,
  BarElement,
  CategoryScale,
  Legend,
  LineController,
  LineElement,
  LinearScale,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import { registerChart } from './chart-setup';
import { Chart as ChartView } from 'react-chartjs-2';
import { CHART_COLOURS } from './chart-colours';

registerChart(BarController, BarElement, CategoryScale, LineController, LineElement, LinearScale, PointElement, Legend, Tooltip);

const { ink: INK, brass: BRASS, slate: SLATE } = CHART_COLOURS;

const pct = (v: number) => `${(v * 100).toFixed(1)}%`;

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
      <ChartView type="bar" data={data} options={options} role="img" aria-label={summary} />
    </div>
  );
}
