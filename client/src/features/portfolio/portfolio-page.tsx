import { useState } from 'react';
import { Cautions, EmptyState, ErrorNotice, Figure, Loading, PageHeader, Panel } from '../../components/ui';
import { GLYPHS, STATUS_WORDS } from '../../../../server/words';
import { day } from '../../lib/format';
import { allRoles, useMe } from '../auth';
import { COHORT_STATUSES } from '../../../../server/designs/designs.schema';
import type { PortfolioFilter } from '../../../../server/portfolio/portfolio.schema';
import { usePortfolio } from './get-portfolio';
import { PortfolioTable } from './portfolio-table';
import { DigestPreviewPanel } from './digest-preview';

const selectClass = 'rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm';

/** Portfolio: every trial and cohort the user takes part in, as a sponsor's operations lead reads it on a Monday. */
export function PortfolioPage() {
  const [filter, setFilter] = useState<PortfolioFilter>({});
  const { data, isPending, error, isFetching } = usePortfolio(filter);
  const { data: me } = useMe();
  const showDigest = !!me?.environment.outbox && allRoles(me).includes('sponsor');
  const rows = data?.rows ?? [];
  const trials = new Set(rows.map((r) => r.trialId)).size;
  const hiddenReasons = [...new Set(rows.filter((r) => !r.released).flatMap((r) => (r.efficacyHidden ? [r.efficacyHidden] : [])))];
  const anyReleased = rows.some((r) => r.efficacyHidden !== undefined && r.released);
  return (
    <div className="grid gap-4">
      <PageHeader title="Portfolio" subtitle={data ? `Every trial you take part in, as of ${day(data.asOf)}.` : 'Every trial you take part in.'} />
      {isPending ? (
        <Loading label="Loading your trials" />
      ) : error ? (
        <ErrorNotice error={error} />
      ) : data.indications.length === 0 ? (
        <EmptyState>You are not a member of any trial yet. A trial manager can invite you.</EmptyState>
      ) : (
        <>
          <div className="flex flex-wrap gap-8">
            <Figure label="Trials" value={trials} />
            <Figure label="Cohorts" value={rows.length} />
            <Figure label="Enrolled" value={rows.reduce((n, r) => n + r.enrolled, 0)} />
            <Figure label="This week" value={rows.reduce((n, r) => n + r.enrolledLastWeek, 0)} hint="enrolled in the last 7 days" />
            <Figure label="Outcomes pending" value={rows.reduce((n, r) => n + r.pendingOutcomes, 0)} />
          </div>
          <Panel
            title="Trials and cohorts"
            actions={
              <div className="flex flex-wrap items-center gap-3">
                <label className="flex items-center gap-1 text-xs font-semibold text-ink-700 uppercase">
                  Status
                  <select className={selectClass} value={filter.status ?? ''} onChange={(e) => setFilter({ ...filter, status: (e.target.value || undefined) as PortfolioFilter['status'] })}>
                    <option value="">Any</option>
                    {COHORT_STATUSES.map((s) => (
                      <option key={s} value={s}>
                        {STATUS_WORDS[s].label}
                      </option>
                    ))}
                  </select>
                </label>
                <label className="flex items-center gap-1 text-xs font-semibold text-ink-700 uppercase">
                  Indication
                  <select className={selectClass} value={filter.indication ?? ''} onChange={(e) => setFilter({ ...filter, indication: e.target.value || undefined })}>
                    <option value="">Any</option>
                    {data.indications.map((i) => (
                      <option key={i} value={i}>
                        {i}
                      </option>
                    ))}
                  </select>
                </label>
                {isFetching && <span className="text-xs text-ink-500">Updating…</span>}
              </div>
            }
          >
            <PortfolioTable rows={rows} />
            {anyReleased && (
              <p className="mt-3 text-xs text-ink-500">
                <span aria-hidden>{GLYPHS.released} </span>
                Released figures are those of the data cut a committee decision released, frozen at the date shown: later outcomes do not move them.
              </p>
            )}
            {hiddenReasons.map((reason) => (
              <p key={reason} className="mt-3 text-xs text-ink-500">
                <span aria-hidden>{GLYPHS.withheld} </span>
                Not released: {reason}
              </p>
            ))}
          </Panel>
          {showDigest && <DigestPreviewPanel />}
          <Cautions />
        </>
      )}
    </div>
  );
}
