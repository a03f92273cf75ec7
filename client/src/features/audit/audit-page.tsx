import { useMemo, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { dateTime } from '../../lib/format';
import { useTrialContext } from '../trials';
import { AuditFiltersForm } from './audit-filters';
import { ChangeView } from './change-view';
import { actionWords, entityWords } from './entity-words';
import { useAudit, type AuditEntry, type AuditFilters } from './get-audit';

const PAGE_SIZE = 50;
const column = createColumnHelper<AuditEntry>();

/** Every recorded change to the trial: who, when, what, why, and the values before and after. */
export function AuditPage() {
  const trial = useTrialContext();
  const [filters, setFilters] = useState<AuditFilters>({});
  const [pageIndex, setPageIndex] = useState(0);
  const { data, isPending, error, isFetching } = useAudit(trial.id, filters, { limit: PAGE_SIZE, offset: pageIndex * PAGE_SIZE });
  const columns = useMemo(
    () => [
      column.accessor('at', { header: 'When', cell: (c) => <span className="whitespace-nowrap tabular-nums">{dateTime(c.getValue())}</span> }),
      column.accessor((e) => e.actorEmail ?? 'the system', {
        id: 'who',
        header: 'Who',
        cell: (c) => (
          <span title={c.row.original.actorName ?? undefined} className="break-all">
            {c.getValue()}
          </span>
        ),
      }),
      column.accessor((e) => `${entityWords(e.entityType)} ${e.entityId}`, {
        id: 'what',
        header: 'What',
        cell: (c) => (
          <div>
            <div className="font-semibold">{entityWords(c.row.original.entityType)}</div>
            <div className="font-mono text-xs break-all text-ink-500">{c.row.original.entityId}</div>
          </div>
        ),
      }),
      column.accessor((e) => actionWords(e.action), { id: 'action', header: 'Action' }),
      column.accessor('reason', { header: 'Reason', cell: (c) => c.getValue() ?? <span className="text-ink-400">—</span> }),
      column.display({ id: 'change', header: 'Before → after', cell: (c) => <ChangeView before={c.row.original.before} after={c.row.original.after} /> }),
    ],
    [],
  );
  return (
    <div className="grid gap-4">
      <PageHeader title="Audit trail" subtitle="Append-only: every change to this trial, with who made it, when, and why." />
      <Panel title="Filters">
        <AuditFiltersForm
          entityTypes={data?.entityTypes ?? []}
          onApply={(next) => {
            setFilters(next);
            setPageIndex(0);
          }}
        />
      </Panel>
      {data?.patientLevelHidden && (
        <p className="text-xs text-ink-500">
          As trial manager you do not see entries about patients, outcomes, data cuts, analyses or committee recommendations.
        </p>
      )}
      <Panel title="Entries" actions={isFetching && !isPending ? <span className="text-xs text-ink-500">Updating…</span> : undefined}>
        {isPending ? (
          <Loading label="Loading the audit trail" />
        ) : error ? (
          <ErrorNotice error={error} />
        ) : (
          <DataTable
            data={data.entries}
            columns={columns}
            label="Audit trail entries"
            empty="No entries match."
            server={{ total: data.total, pageIndex, pageSize: PAGE_SIZE, onPageChange: setPageIndex }}
          />
        )}
      </Panel>
    </div>
  );
}
