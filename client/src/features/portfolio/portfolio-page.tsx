import { Link } from 'react-router-dom';
import { EmptyState, ErrorNotice, Loading, PageHeader, Panel, StatusTag } from '../../components/ui';
import { ROLE_LABELS } from '../../lib/roles';
import { useTrials } from './get-trials';

export function PortfolioPage() {
  const { data: trials, isPending, error } = useTrials();
  return (
    <div>
      <PageHeader title="Portfolio" subtitle="Every trial you take part in." />
      {isPending ? (
        <Loading label="Loading your trials" />
      ) : error ? (
        <ErrorNotice error={error} />
      ) : trials.length === 0 ? (
        <EmptyState>You are not a member of any trial yet. A trial manager can invite you.</EmptyState>
      ) : (
        <Panel>
          <table className="w-full text-sm">
            <thead>
              <tr className="border-b border-ink-200 text-left text-xs tracking-wide text-ink-500 uppercase">
                <th className="py-2 pr-4">Trial</th>
                <th className="py-2 pr-4">Indication</th>
                <th className="py-2 pr-4">Status</th>
                <th className="py-2">Your roles</th>
              </tr>
            </thead>
            <tbody>
              {trials.map((trial) => (
                <tr key={trial.id} className="border-b border-ink-100 last:border-0">
                  <td className="py-2 pr-4">
                    <Link to={`/trials/${trial.id}`} className="font-semibold text-ink-900 underline-offset-2 hover:underline">
                      {trial.code}
                    </Link>
                    <div className="text-xs text-ink-500">{trial.title}</div>
                  </td>
                  <td className="py-2 pr-4">{trial.indication}</td>
                  <td className="py-2 pr-4">
                    <StatusTag status={trial.status} />
                  </td>
                  <td className="py-2 text-xs text-ink-600">{trial.myRoles.map((r) => ROLE_LABELS[r]).join(', ')}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </Panel>
      )}
    </div>
  );
}
