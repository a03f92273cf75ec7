import { useState } from 'react';
import { PageHeader } from '../../components/ui';
import { hasAnyRole } from '../../lib/roles';
import { MembersPanel } from '../people';
import { useTrialContext } from './use-trial-context';
import { CohortsPanel } from './cohorts-panel';
import { ProtocolSettingsPanel } from './protocol-settings-panel';
import { TrialRecordPanel } from './trial-record-panel';

/** A trial's set-up, shown as its People & sites page: members and invitations, the trial record, its cohorts and its protocol settings. */
export function TrialSetupPage() {
  const trial = useTrialContext();
  const isAdmin = hasAnyRole(trial.myRoles, ['admin']);
  // The trial form and the cohort form share field names, so only one of them is open at a time: 'trial' or a cohort's id.
  const [open, setOpen] = useState<string | null>(null);
  return (
    <div className="grid gap-4">
      <PageHeader
        title="People & sites"
        subtitle={isAdmin ? 'Invite people, change their roles and sites, and keep the trial record current.' : 'Who works on this trial, and how it is set up.'}
      />
      <MembersPanel trial={trial} canEdit={isAdmin} />
      <TrialRecordPanel trial={trial} canEdit={isAdmin} editing={open === 'trial'} setEditing={(on) => setOpen(on ? 'trial' : null)} />
      <CohortsPanel trial={trial} canEdit={isAdmin} editing={open === 'trial' ? null : open} setEditing={setOpen} />
      <ProtocolSettingsPanel trial={trial} canEdit={hasAnyRole(trial.myRoles, ['statistician'])} />
    </div>
  );
}
