/**
 * The data cut's boundary chart (Chart.js, loaded on demand): responders against decided patients
 * with the boundaries (components/boundary-lines.ts). Lines differ by dash and point shape as well
 * as colour, and the chart carries a text summary.
 */
import { Legend, LineElement, LinearScale, PointElement, ScatterController, Tooltip, type ChartData, type ChartOptions } from 'chart.js';
import { registerChart } from '../../components/chart-setup';
import { Scatter } from 'react-chartjs-2';
import { CHART_COLOURS } from '../../components/chart-colours';
import { boundaryLines } from '../../components/boundary-lines';
import type { CohortAnalysis } from './types';

registerChart(LineElement, LinearScale, PointElement, ScatterController, Legend, Tooltip);

const { observed: OBSERVED } = CHART_COLOURS;

export function BoundaryChart({ cohort }: { cohort: CohortAnalysis }) {
  const design = cohort.design;
  if (!design) return null;
  const last = cohort.path.at(-1);
  const lines = cohort.boundaries.map((b) => ({ k: b.evaluable, futility: b.futility, upper: b.success }));
  const data: ChartData<'scatter'> = {
    datasets: [
      ...boundaryLines(lines, design.r1 !== null ? design.n1 : null),
      { label: 'Observed responders', data: [{ x: 0, y: 0 }, ...cohort.path.map((p) => ({ x: p.evaluable, y: p.responders }))], showLine: true, borderColor: OBSERVED, backgroundColor: OBSERVED, pointStyle: 'rectRot', pointRadius: 3, borderWidth: 1 },
    ],
  };
  const options: ChartOptions<'scatter'> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom', labels: { usePointStyle: true } } },
    scales: {
      x: { min: 0, max: Math.max(design.n, last?.evaluable ?? 0), title: { display: true, text: 'Decided patients' }, ticks: { precision: 0 } },
      y: { min: 0, max: design.r + 2, title: { display: true, text: 'Responders' }, ticks: { precision: 0 } },
    },
  };
  const summary = last
    ? `Cohort ${cohort.code}: ${last.responders} responders among ${last.evaluable} decided patients. ${design.r1 !== null ? `Stage 1 stops for futility at ${design.r1} or fewer among ${design.n1} and is passed above ${design.r1}; ` : ''}the final result is promising above ${design.r} among ${design.n}.`
    : `Cohort ${cohort.code}: no decided outcome yet.`;
  return (
    <div className="h-80">
      <Scatter data={data} options={options} role="img" aria-label={summary} />
    </div>
  );
}
