/**
 * Cumulative enrolment charts (Chart.js, loaded on demand): overall against the plan, and by site.
 * Actual lines are solid with points, plans dashed without, so the two read apart without colour.
 */
import { CategoryScale, Legend, LineController, LineElement, LinearScale, PointElement, Tooltip, type ChartDataset } from 'chart.js';
import { registerChart } from '../../components/chart-setup';
import { Line } from 'react-chartjs-2';
import { format, parseISO } from 'date-fns';
import type { SeriesPoint, SiteRow } from './get-accrual';

registerChart(LineController, LineElement, PointElement, LinearScale, CategoryScale, Legend, Tooltip);

const INK = ['#14213d', '#b08d3c', '#4a5570', '#8f7130', '#6b7690', '#243050', '#d2b46a', '#9aa3b5'];
const POINTS = ['circle', 'rect', 'triangle', 'rectRot', 'crossRot', 'star', 'rectRounded', 'cross'] as const;

const monthLabel = (period: string) => format(parseISO(`${period}-01`), 'MMM yyyy');

const options = (yTitle: string) => ({
  responsive: true,
  maintainAspectRatio: false,
  animation: false as const,
  interaction: { mode: 'index' as const, intersect: false },
  plugins: { legend: { position: 'bottom' as const, labels: { usePointStyle: true } } },
  scales: { y: { beginAtZero: true, title: { display: true, text: yTitle } } },
});

function OverallChart({ points, granularity }: { points: SeriesPoint[]; granularity: 'month' | 'week' }) {
  const labels = points.map((p) => (granularity === 'month' ? monthLabel(p.period) : format(parseISO(p.start), 'd MMM yyyy')));
  const last = points.at(-1);
  const datasets: ChartDataset<'line', (number | null)[]>[] = [
    { label: 'Enrolled (cumulative)', data: points.map((p) => p.cumulative), borderColor: INK[0], backgroundColor: INK[0], pointStyle: 'circle', pointRadius: 2 },
  ];
  if (points.some((p) => p.planned !== null)) {
    datasets.push({ label: 'Plan', data: points.map((p) => p.planned), borderColor: INK[1], backgroundColor: INK[1], borderDash: [6, 4], pointRadius: 0 });
  }
  return (
    <div className="h-72">
      <Line
        data={{ labels, datasets }}
        options={options('Patients')}
        role="img"
        aria-label={last ? `Cumulative enrolment: ${last.cumulative} enrolled${last.planned !== null ? ` against ${last.planned} planned` : ''} by ${last.end}.` : 'No enrolment yet.'}
      />
    </div>
  );
}

function SitesChart({ sites }: { sites: SiteRow[] }) {
  const periods = sites[0]?.monthly.map((p) => p.period) ?? [];
  const datasets: ChartDataset<'line', (number | null)[]>[] = sites.flatMap((site, i) => {
    const color = INK[i % INK.length];
    const actual: ChartDataset<'line', (number | null)[]> = {
      label: `${site.code} enrolled`,
      data: site.monthly.map((p) => p.cumulative),
      borderColor: color,
      backgroundColor: color,
      pointStyle: POINTS[i % POINTS.length],
      pointRadius: 3,
    };
    const plan: ChartDataset<'line', (number | null)[]> = {
      label: `${site.code} plan`,
      data: site.monthly.map((p) => p.planned),
      borderColor: color,
      backgroundColor: color,
      borderDash: [6, 4],
      pointRadius: 0,
    };
    return site.plannedPerMonth ? [actual, plan] : [actual];
  });
  return (
    <div className="h-72">
      <Line
        data={{ labels: periods.map(monthLabel), datasets }}
        options={options('Patients')}
        role="img"
        aria-label={`Cumulative enrolment by site: ${sites.map((s) => `${s.code} ${s.enrolled}`).join(', ')}.`}
      />
    </div>
  );
}

export default function AccrualCharts(props: { kind: 'overall'; points: SeriesPoint[]; granularity: 'month' | 'week' } | { kind: 'sites'; sites: SiteRow[] }) {
  return props.kind === 'overall' ? <OverallChart points={props.points} granularity={props.granularity} /> : <SitesChart sites={props.sites} />;
}
