/**
 * The live path of a cohort (Chart.js, loaded on demand): responders against patients with an
 * outcome, with the locked design's stopping boundaries and a mark at n1. Lines differ by dash and
 * point shape as well as colour, and the chart carries a text summary for screen readers.
 */
import { Chart, Legend, LineElement, LinearScale, PointElement, ScatterController, Tooltip, type ChartData, type ChartOptions } from 'chart.js';
import { Scatter } from 'react-chartjs-2';
import { CHART_COLOURS } from '../../components/chart-colours';
import type { LiveCohort } from './get-evaluation';

Chart.register(ScatterController, LineElement, PointElement, LinearScale, Legend, Tooltip);

const { ink: INK, brass: BRASS, observed: OBSERVED } = CHART_COLOURS;

/** For k patients with an outcome: at or below `futility` the negative result is settled, at or above `success` the positive one. */
export function boundaries(design: NonNullable<LiveCohort['design']>) {
  const points: Array<{ k: number; futility: number | null; success: number }> = [];
  const twoStage = design.r1 !== null && design.n1 !== null;
  for (let k = 1; k <= design.n; k++) {
    const [r, n] = twoStage && k <= (design.n1 as number) ? [design.r1 as number, design.n1 as number] : [design.r, design.n];
    const futility = r - (n - k);
    points.push({ k, futility: futility >= 0 ? futility : null, success: r + 1 });
  }
  return points;
}

export function EvaluationChart({ cohort }: { cohort: LiveCohort }) {
  const design = cohort.design;
  if (!design) return null;
  const lines = boundaries(design);
  const last = cohort.path.at(-1);
  const top = design.r + 2;
  const data: ChartData<'scatter'> = {
    datasets: [
      { label: 'Observed responders', data: [{ x: 0, y: 0 }, ...cohort.path.map((p) => ({ x: p.evaluable, y: p.responders }))], showLine: true, borderColor: OBSERVED, backgroundColor: OBSERVED, pointStyle: 'rectRot', pointRadius: 3, borderWidth: 1.5 },
      { label: 'Futility boundary (at or below: rule met)', data: lines.map((b) => ({ x: b.k, y: b.futility ?? Number.NaN })), showLine: true, stepped: 'before', borderColor: INK, backgroundColor: INK, pointRadius: 0, borderWidth: 2 },
      { label: 'Success boundary (at or above: stage passed / promising)', data: lines.map((b) => ({ x: b.k, y: b.success })), showLine: true, stepped: 'before', borderColor: BRASS, backgroundColor: BRASS, borderDash: [6, 4], pointRadius: 0, borderWidth: 2 },
      ...(design.n1 !== null
        ? [{ label: `End of stage 1 (n1 = ${design.n1})`, data: [{ x: design.n1, y: 0 }, { x: design.n1, y: top }], showLine: true, borderColor: '#9aa3b5', backgroundColor: '#9aa3b5', borderDash: [2, 3], pointRadius: 0, borderWidth: 1 }]
        : []),
    ],
  };
  const options: ChartOptions<'scatter'> = {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom', labels: { usePointStyle: true } } },
    scales: {
      x: { min: 0, max: Math.max(design.n, last?.evaluable ?? 0), title: { display: true, text: 'Patients with an outcome (counted)' }, ticks: { precision: 0 } },
      y: { min: 0, max: top, title: { display: true, text: 'Responders' }, ticks: { precision: 0 } },
    },
  };
  const summary = last
    ? `Cohort ${cohort.cohortCode}: ${last.responders} responders among ${last.evaluable} patients with an outcome. ${design.r1 !== null ? `Stage 1 stops for futility at ${design.r1} or fewer among ${design.n1}; ` : ''}promising above ${design.r} among ${design.n}.`
    : `Cohort ${cohort.cohortCode}: no outcome recorded yet.`;
  return (
    <div className="h-72">
      <Scatter data={data} options={options} role="img" aria-label={summary} />
    </div>
  );
}
