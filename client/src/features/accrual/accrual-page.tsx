import { Suspense, lazy, useState } from 'react';
import { Cautions, EmptyState, ErrorNotice, Figure, Loading, Panel } from '../../components/ui';
import { day } from '../../lib/format';
import { CAUTIONS, GLYPHS } from '../../../../server/words';
import { useTrialContext } from '../trials';
import { useAccrual } from './get-accrual';
import { ProjectionsPanel } from './projections-panel';
import { SiteTable } from './site-table';

const AccrualCharts = lazy(() => import('./accrual-charts'));

const PROJECTION_CAUTION = 'Projected dates are estimates from recent accrual, with the range of the slowest and fastest recent months; they are not commitments.';

/** Accrual: enrolment over time against the plan, overall and by site, with projections and idle-site warnings. */
export function AccrualPage() {
  const trial = useTrialContext();
  const { data: accrual, isPending, error } = useAccrual(trial.id);
  const [granularity, setGranularity] = useState<'month' | 'week'>('month');
  if (isPending) return <Loading label="Loading accrual" />;
  if (error) return <ErrorNotice error={error} />;
  const { totals, plan } = accrual;
  const points = granularity === 'month' ? accrual.timeline.monthly : accrual.timeline.weekly;
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap gap-8">
        <Figure label="Enrolled" value={totals.enrolled} hint={`as of ${day(accrual.asOf)}`} />
        <Figure label="Evaluable" value={totals.evaluable} />
        <Figure label="Outcomes pending" value={totals.pendingOutcomes} />
        <Figure
          label="Last enrolment"
          value={totals.daysSinceLastEnrolment === null ? '—' : `${totals.daysSinceLastEnrolment} d`}
          hint={totals.lastEnrolledOn ? `ago, on ${day(totals.lastEnrolledOn)}` : 'nobody enrolled yet'}
        />
        <Figure label="Plan" value={plan.perMonth ?? '—'} hint={plan.startDate ? `patients / month from ${day(plan.startDate)}` : 'no start date set'} />
      </div>

      {accrual.warnings.length > 0 && (
        <section aria-label="Idle sites" className="border-l-4 border-alert-600 bg-alert-50 px-4 py-3 text-sm">
          <p className="font-semibold text-alert-600">
            <span aria-hidden>{GLYPHS.warning} </span>
            {accrual.warnings.length === 1 ? 'One site' : `${accrual.warnings.length} sites`} enrolled nobody for {accrual.inactivityWarningWeeks} weeks or more
          </p>
          <ul className="mt-1 list-disc pl-5">
            {accrual.warnings.map((w) => (
              <li key={w.siteId}>{w.text}</li>
            ))}
          </ul>
        </section>
      )}

      <Panel
        title="Cumulative enrolment against the plan"
        actions={
          <fieldset className="flex items-center gap-3 text-xs">
            <legend className="sr-only">Group by</legend>
            {(['month', 'week'] as const).map((g) => (
              <label key={g} className="flex items-center gap-1">
                <input type="radio" name="granularity" value={g} checked={granularity === g} onChange={() => setGranularity(g)} />
                {g === 'month' ? 'Months' : 'Weeks'}
              </label>
            ))}
          </fieldset>
        }
      >
        {points.length === 0 ? (
          <EmptyState>Nothing to draw yet: the trial has no start date and nobody is enrolled.</EmptyState>
        ) : (
          <Suspense fallback={<Loading label="Loading the chart" />}>
            <AccrualCharts kind="overall" points={points} granularity={granularity} />
          </Suspense>
        )}
      </Panel>

      <ProjectionsPanel cohorts={accrual.cohorts} />

      <Panel title={accrual.sitesShown === 'own' ? 'Your sites' : 'By site'}>
        {accrual.sites.length > 0 && accrual.sites[0].monthly.length > 0 && (
          <Suspense fallback={<Loading label="Loading the chart" />}>
            <AccrualCharts kind="sites" sites={accrual.sites} />
          </Suspense>
        )}
        <div className="mt-4">
          <SiteTable sites={accrual.sites} warningWeeks={accrual.inactivityWarningWeeks} />
        </div>
      </Panel>

      <Cautions items={[...CAUTIONS, PROJECTION_CAUTION]} />
    </div>
  );
}
