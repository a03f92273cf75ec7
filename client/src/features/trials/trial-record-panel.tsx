import { Button, Panel } from '../../components/ui';
import { day } from '../../lib/format';
import { trialUpdateSchema } from '../../../../server/trials/trials.schema';
import { showServerError } from '../../lib/form-errors';
import { TrialForm } from './trial-form';
import type { Trial } from './get-trial';
import { useUpdateTrial } from './use-update-trial';

/** The trial's record and sites; the admin edits them here. */
export function TrialRecordPanel({ trial, canEdit, editing, setEditing }: { trial: Trial; canEdit: boolean; editing: boolean; setEditing: (on: boolean) => void }) {
  const update = useUpdateTrial(trial.id);
  return (
    <Panel
      title="Trial record"
      actions={canEdit && <Button variant="secondary" onClick={() => setEditing(!editing)}>{editing ? 'Close the form' : 'Edit trial'}</Button>}
    >
      {editing ? (
        <TrialForm
          trial={trial}
          submitLabel="Save trial"
          onSubmit={async (values, helpers) => {
            helpers.setStatus(undefined);
            try {
              await update.mutateAsync(trialUpdateSchema.cast(values, { stripUnknown: true }));
              setEditing(false);
            } catch (error) {
              showServerError(error, helpers);
            }
          }}
        />
      ) : (
        <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[12rem_1fr]">
          <dt className="text-ink-500">Protocol code</dt>
          <dd className="font-mono">{trial.code}</dd>
          <dt className="text-ink-500">Indication</dt>
          <dd>{trial.indication}</dd>
          <dt className="text-ink-500">Endpoint</dt>
          <dd>{trial.endpointDefinition}</dd>
          <dt className="text-ink-500">Sponsor</dt>
          <dd>{trial.sponsorName ?? '—'}</dd>
          <dt className="text-ink-500">Planned accrual</dt>
          <dd className="tabular-nums">{trial.plannedAccrualPerMonth === null ? '—' : `${trial.plannedAccrualPerMonth} patients a month`}</dd>
          <dt className="text-ink-500">Start date</dt>
          <dd>{day(trial.startDate)}</dd>
          <dt className="text-ink-500">Sites</dt>
          <dd>
            {trial.sites.length === 0 ? (
              'None yet'
            ) : (
              <ul>
                {trial.sites.map((site) => (
                  <li key={site.id}>
                    <span className="font-mono font-semibold">{site.code}</span> {site.name}
                    <span className="text-ink-500 tabular-nums"> · {site.plannedAccrualPerMonth ?? '—'} a month</span>
                  </li>
                ))}
              </ul>
            )}
          </dd>
        </dl>
      )}
    </Panel>
  );
}
