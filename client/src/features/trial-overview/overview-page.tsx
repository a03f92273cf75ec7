import { lazy, Suspense } from 'react';
import { Loading, Panel, SafetyPauseTag, StatusTag } from '../../components/ui';
import { day } from '../../lib/format';
import { ROLE_LABELS } from '../../lib/roles';
import { useTrialContext } from '../trials';
import { EvaluationPanel } from './evaluation-panel';

// Safety's page code stays out of the bundle the app starts with.
const SafetyOverview = lazy(() => import('../safety').then((m) => ({ default: m.SafetyOverview })));

export function OverviewPage() {
  const trial = useTrialContext();
  return (
    <div className="grid gap-4 lg:grid-cols-3">
      <Panel title="Trial" className="lg:col-span-2">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
          <dt className="text-ink-500">Indication</dt>
          <dd>{trial.indication}</dd>
          <dt className="text-ink-500">Endpoint</dt>
          <dd>{trial.endpointDefinition}</dd>
          <dt className="text-ink-500">Start</dt>
          <dd>{day(trial.startDate)}</dd>
          <dt className="text-ink-500">Planned accrual</dt>
          <dd className="tabular-nums">{trial.plannedAccrualPerMonth ?? '—'} patients / month</dd>
          <dt className="text-ink-500">Your roles</dt>
          <dd>{trial.myRoles.map((r) => ROLE_LABELS[r]).join(', ')}</dd>
        </dl>
      </Panel>
      <Panel title={trial.cohorts.length > 1 ? 'Cohorts' : 'Cohort'}>
        <ul className="space-y-2 text-sm">
          {trial.cohorts.map((cohort) => (
            <li key={cohort.id} className="flex items-center justify-between gap-2">
              <span>
                <span className="font-mono text-xs text-ink-500">{cohort.code}</span> {cohort.name}
              </span>
              <span className="flex flex-wrap justify-end gap-1">
                <StatusTag status={cohort.status} />
                {cohort.safetyPause && <SafetyPauseTag />}
              </span>
            </li>
          ))}
        </ul>
      </Panel>
      <div className="lg:col-span-3">
        <EvaluationPanel trialId={trial.id} />
      </div>
      {/* Every member sees the safety panel; the server leaves out the figures the visibility rule withholds. */}
      <div className="lg:col-span-3">
        <Suspense fallback={<Loading label="Loading the safety state" />}>
          <SafetyOverview trialId={trial.id} />
        </Suspense>
      </div>
    </div>
  );
}
