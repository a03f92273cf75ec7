import { useMemo, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, ErrorNotice, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { day } from '../../lib/format';
import { ROLE_LABELS } from '../../lib/roles';
import { useMemberships, type Membership } from './get-memberships';
import { InviteForm } from './invite-form';
import { MembershipEditor } from './membership-editor';
import { MembershipStatus } from './membership-status';
import type { Trial } from '../trials';
import { useRemoveMembership } from './use-remove-membership';
import { GLYPHS } from '../../../../server/words';

const column = createColumnHelper<Membership>();

type SideForm = { kind: 'invite' } | { kind: 'edit'; membership: Membership } | { kind: 'remove'; membership: Membership };

/** Who holds which role on the trial; the admin invites, changes roles and sites, and removes. */
export function MembersPanel({ trial, canEdit }: { trial: Trial; canEdit: boolean }) {
  const { data: memberships, isPending, error } = useMemberships(trial.id);
  const remove = useRemoveMembership(trial.id);
  const [side, setSide] = useState<SideForm>({ kind: 'invite' });
  const [notice, setNotice] = useState<string | null>(null);
  const done = (message?: string) => {
    setNotice(message ?? null);
    setSide({ kind: 'invite' });
  };
  const columns = useMemo(
    () => [
      column.accessor((m) => `${m.name ?? ''} ${m.email}`, {
        id: 'person',
        header: 'Person',
        cell: (c) => (
          <div>
            <div className="font-semibold">{c.row.original.name ?? '—'}</div>
            <div className="text-xs text-ink-500">{c.row.original.email}</div>
          </div>
        ),
      }),
      column.accessor((m) => ROLE_LABELS[m.role], { id: 'role', header: 'Role' }),
      column.accessor((m) => m.siteCode ?? '', { id: 'site', header: 'Site', cell: (c) => <span className="font-mono">{c.getValue() || '—'}</span> }),
      column.accessor('status', { header: 'Status', cell: (c) => <MembershipStatus status={c.getValue()} /> }),
      column.accessor('createdAt', { header: 'Since', cell: (c) => day(c.getValue()), enableGlobalFilter: false }),
      ...(canEdit
        ? [
            column.display({
              id: 'actions',
              header: () => <span className="sr-only">Actions</span>,
              cell: (c) => (
                <div className="flex gap-1">
                  <Button variant="quiet" onClick={() => setSide({ kind: 'edit', membership: c.row.original })} aria-label={`Change role of ${c.row.original.email}`}>
                    Change
                  </Button>
                  <Button variant="quiet" onClick={() => setSide({ kind: 'remove', membership: c.row.original })} aria-label={`Remove ${c.row.original.email}`}>
                    Remove
                  </Button>
                </div>
              ),
            }),
          ]
        : []),
    ],
    [canEdit],
  );

  const table = isPending ? (
    <Loading label="Loading members" />
  ) : error ? (
    <ErrorNotice error={error} />
  ) : (
    <DataTable data={memberships} columns={columns} label="Members" filterLabel="Filter members" empty="Nobody yet." initialSorting={[{ id: 'role', desc: false }]} />
  );

  return (
    <div className={canEdit ? 'grid gap-4 lg:grid-cols-[2fr_1fr]' : ''}>
      <Panel title="Members">{table}</Panel>
      {canEdit && (
        <Panel title={side.kind === 'invite' ? 'Invite someone' : side.kind === 'edit' ? 'Change role or site' : 'Remove a member'}>
          {notice && (
            <p role="status" className="mb-3 text-sm text-good-700">
              <span aria-hidden>{GLYPHS.done} </span>
              {notice}
            </p>
          )}
          {side.kind === 'invite' && <InviteForm trialId={trial.id} sites={trial.sites} onInvited={setNotice} />}
          {side.kind === 'edit' && <MembershipEditor membership={side.membership} sites={trial.sites} onDone={done} />}
          {side.kind === 'remove' && (
            <div className="grid gap-3 text-sm">
              <p>
                Remove <strong>{side.membership.name ?? side.membership.email}</strong> as {ROLE_LABELS[side.membership.role]}
                {side.membership.siteCode ? ` at ${side.membership.siteCode}` : ''}? They lose access to this trial at once. The audit trail keeps the change.
              </p>
              {remove.error && <ErrorNotice error={remove.error} title="Nobody was removed" />}
              <div className="flex gap-2">
                <Button
                  variant="danger"
                  disabled={remove.isPending}
                  onClick={() => remove.mutate(side.membership.id, { onSuccess: () => done(`${side.membership.email} is removed from the trial.`) })}
                >
                  {remove.isPending ? 'Removing…' : 'Remove'}
                </Button>
                <Button
                  variant="secondary"
                  onClick={() => {
                    remove.reset();
                    done();
                  }}
                >
                  Cancel
                </Button>
              </div>
            </div>
          )}
        </Panel>
      )}
    </div>
  );
}
