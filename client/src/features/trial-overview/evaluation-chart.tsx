/**
 * The live path of a cohort (Chart.js, loaded on demand): responders against decided patients, with
 * the locked design's boundaries (components/boundary-lines.ts) and a mark at n1. Lines differ by
 * dash and point shape as well as colour, and the chart carries a text summary for screen readers.
 */
import { Legend, LineElement, LinearScale, PointElement, ScatterController, Tooltip, type ChartData, type ChartOptions } from 'chart.js';
import { registerChart } from '../../components/chart-setup';
import { Scatter } from 'react-chartjs-2';
import { CHART_COLOURS } from '../../components/chart-colours';
import { boundaryLines, type BoundaryPoint } from '../../components/boundary-lines';
import type { LiveCohort } from './get-evaluation';

registerChart(ScatterController, LineElement, PointElement, LinearScale, Legend, Tooltip);

const { observed: OBSERVED } = CHART_COLOURS;

/** For k decided patients, the boundaries of the rule that applies at k: stage 1's up to n1, the final rule's after. */
export function boundaries(design: NonNullable<LiveCohort['design']>): BoundaryPoint[] {
  const points: BoundaryPoint[] = [];
  const twoStage = design.r1 !== null && design.n1 !== null;
  for (let k = 1; k <= design.n; k++) {
    const [r, n] = twoStage && k <= (design.n1 as number) ? [design.r1 as number, design.n1 as number] : [design.r, design.n];
    const futility = r - (n - k);
    points.push({ k, futility: futility >= 0 ? futility : null, upper: r + 1 });
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
      ...boundaryLines(lines, design.r1 !== null ? design.n1 : null),
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
      x: { min: 0, max: Math.max(design.n, last?.evaluable ?? 0), title: { display: true, text: 'Decided patients' }, ticks: { precision: 0 } },
      y: { min: 0, max: top, title: { display: true, text: 'Responders' }, ticks: { precision: 0 } },
    },
  };
  const summary = last
    ? `Cohort ${cohort.cohortCode}: ${last.responders} responders among ${last.evaluable} decided patients. ${design.r1 !== null ? `Stage 1 stops for futility at ${design.r1} or fewer among ${design.n1} and is passed above ${design.r1}; ` : ''}the final result is promising above ${design.r} among ${design.n}.`
    : `Cohort ${cohort.cohortCode}: no outcome recorded yet.`;
  return (
    <div className="h-72">
      <Scatter data={data} options={options} role="img" aria-label={summary} />
    </div>
  );
}
