/** A trial's frame: its code, title and status, and the pages this user's roles open on it. */
import { NavLink, Outlet, useParams } from 'react-router-dom';
import { ErrorNotice, Loading, StatusTag } from '../components/ui';
import { hasAnyRole } from '../lib/roles';
import { useTrial } from '../features/trials';
import { trialNav } from './features';

export function TrialLayout() {
  const { trialId = '' } = useParams();
  const { data: trial, isPending, error } = useTrial(trialId);
  if (isPending) return <Loading label="Loading the trial" />;
  if (error) return <ErrorNotice error={error} title="This trial could not be opened" />;
  const items = trialNav.filter((item) => !item.roles || hasAnyRole(trial.myRoles, item.roles));
  return (
    <div>
      <div className="mb-4 flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <span className="font-mono text-sm font-semibold text-brass-700">{trial.code}</span>
        <h1 className="text-xl font-semibold text-ink-950">{trial.title}</h1>
        <StatusTag status={trial.status} />
      </div>
      <nav aria-label="Trial pages" className="mb-5 flex flex-wrap gap-1 border-b border-ink-200">
        {items.map((item) => (
          <NavLink
            key={item.path}
            to={item.path === '' ? `/trials/${trialId}` : `/trials/${trialId}/${item.path}`}
            end={item.path === ''}
            className={({ isActive }) =>
              `-mb-px border-b-2 px-3 py-2 text-sm font-medium ${isActive ? 'border-brass-500 text-ink-950' : 'border-transparent text-ink-500 hover:text-ink-900'}`
            }
          >
            {item.label}
          </NavLink>
        ))}
      </nav>
      <Outlet context={trial} />
    </div>
  );
}
