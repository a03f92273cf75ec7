/** The audit trail of the shared sites: who created or changed which site, when, and what changed. */
import { useMemo, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { ErrorNotice, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { dateTime } from '../../lib/format';
import { ChangeView } from './change-view';
import { actionWords } from './entity-words';
import type { AuditEntry } from './get-audit';
import { useSiteChanges } from './get-site-changes';

const PAGE_SIZE = 20;
const column = createColumnHelper<AuditEntry>();

export function SiteChangesPanel() {
  const [pageIndex, setPageIndex] = useState(0);
  const { data, isPending, error } = useSiteChanges({ limit: PAGE_SIZE, offset: pageIndex * PAGE_SIZE });
  const columns = useMemo(
    () => [
      column.accessor('at', { header: 'When', cell: (c) => <span className="whitespace-nowrap tabular-nums">{dateTime(c.getValue())}</span> }),
      column.accessor((e) => e.actorEmail ?? 'the system', { id: 'who', header: 'Who', cell: (c) => <span className="break-all">{c.getValue()}</span> }),
      column.accessor((e) => actionWords(e.action), { id: 'action', header: 'Action' }),
      column.display({ id: 'change', header: 'Before → after', cell: (c) => <ChangeView before={c.row.original.before} after={c.row.original.after} /> }),
    ],
    [],
  );
  return (
    <Panel title="Changes to sites">
      {isPending ? (
        <Loading label="Loading the changes to sites" />
      ) : error ? (
        <ErrorNotice error={error} />
      ) : (
        <DataTable
          data={data.entries}
          columns={columns}
          label="Changes to sites"
          empty="No site has been created or changed yet."
          server={{ total: data.total, pageIndex, pageSize: PAGE_SIZE, onPageChange: setPageIndex }}
        />
      )}
    </Panel>
  );
}
