import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { dateTime } from '../../lib/format';
import { SiteChangesPanel } from '../audit';
import { useSites, type Site } from './get-sites';
import { SiteForm } from './site-form';
import { GLYPHS } from '../../../../server/words';

const column = createColumnHelper<Site>();

/** People & sites: the global list of sites every trial draws on, its changes, and where new trials start. */
export function SitesPage() {
  const { data: sites, isPending, error } = useSites();
  const [editing, setEditing] = useState<Site | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const columns = useMemo(
    () => [
      column.accessor('code', { header: 'Code', cell: (c) => <span className="font-mono font-semibold">{c.getValue()}</span> }),
      column.accessor('name', { header: 'Name' }),
      column.accessor('country', { header: 'Country' }),
      column.accessor('trialCount', { header: 'Trials', cell: (c) => <span className="tabular-nums">{c.getValue()}</span> }),
      column.accessor('updatedAt', { header: 'Last changed', cell: (c) => dateTime(c.getValue()), enableGlobalFilter: false }),
      column.display({
        id: 'edit',
        header: () => <span className="sr-only">Actions</span>,
        cell: (c) => (
          <Button variant="quiet" onClick={() => setEditing(c.row.original)} aria-label={`Edit site ${c.row.original.code}`}>
            Edit
          </Button>
        ),
      }),
    ],
    [],
  );
  return (
    <div>
      <PageHeader
        title="People & sites"
        subtitle="Sites are shared by every trial. People are invited trial by trial, on each trial's People & sites page."
        actions={
          <Link to="/new-trial" className="inline-flex items-center gap-2 rounded-sm bg-ink-900 px-3 py-1.5 text-sm font-semibold text-white hover:bg-ink-700">
            <span aria-hidden>+</span> New trial
          </Link>
        }
      />
      <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
        <Panel title="Sites">
          {isPending ? <Loading label="Loading sites" /> : error ? <ErrorNotice error={error} /> : (
            <DataTable data={sites} columns={columns} label="Sites" filterLabel="Filter sites" empty="No sites yet." initialSorting={[{ id: 'code', desc: false }]} />
          )}
        </Panel>
        <Panel
          title={editing ? `Edit site ${editing.code}` : 'Add a site'}
          actions={editing && <Button variant="quiet" onClick={() => setEditing(null)}>Cancel</Button>}
        >
          {saved && (
            <p role="status" className="mb-3 text-sm text-good-700">
              <span aria-hidden>{GLYPHS.done} </span>
              {saved}
            </p>
          )}
          <SiteForm
            site={editing ?? undefined}
            onDone={(site) => {
              setSaved(`Site ${site.code} saved.`);
              setEditing(null);
            }}
          />
        </Panel>
      </div>
      <div className="mt-4">
        <SiteChangesPanel />
      </div>
    </div>
  );
}
