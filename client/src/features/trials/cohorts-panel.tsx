import { Form, Formik } from 'formik';
import { Button, ErrorNotice, Panel, StatusTag } from '../../components/ui';
import { TextField } from '../../components/field';
import { cohortSchema, cohortUpdateSchema } from '../../../../server/trials/trials.schema';
import { showServerError } from '../../lib/form-errors';
import type { Cohort, Trial } from './get-trial';
import { useAddCohort } from './use-add-cohort';
import { useUpdateCohort } from './use-update-cohort';

function CohortForm({ trialId, cohort, onDone }: { trialId: string; cohort?: Cohort; onDone: () => void }) {
  const add = useAddCohort(trialId);
  const update = useUpdateCohort(trialId);
  return (
    <Formik
      initialValues={{ code: cohort?.code ?? '', name: cohort?.name ?? '', version: cohort?.version ?? 1 }}
      validationSchema={cohort ? cohortUpdateSchema : cohortSchema}
      onSubmit={async (values, helpers) => {
        helpers.setStatus(undefined);
        try {
          const input = cohortUpdateSchema.cast(values, { stripUnknown: true });
          if (cohort) await update.mutateAsync({ cohortId: cohort.id, ...input });
          else await add.mutateAsync({ code: input.code, name: input.name });
          onDone();
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form noValidate className="grid gap-3 border-t border-ink-100 pt-3 sm:grid-cols-[10rem_1fr_auto] sm:items-end">
          <TextField name="code" label="Cohort code" autoComplete="off" hint="e.g. NSCLC" />
          <TextField name="name" label="Cohort name" autoComplete="off" />
          <div className="flex gap-2">
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : cohort ? 'Save' : 'Add'}
            </Button>
            <Button variant="secondary" onClick={onDone}>
              Cancel
            </Button>
          </div>
          {status && (
            <div className="sm:col-span-3">
              <ErrorNotice error={status} title="The cohort was not saved" />
            </div>
          )}
        </Form>
      )}
    </Formik>
  );
}

/** The trial's cohorts; while the trial is a draft the admin adds and renames them. */
export function CohortsPanel({
  trial,
  canEdit,
  editing,
  setEditing,
}: {
  trial: Trial;
  canEdit: boolean;
  /** The cohort being renamed, 'new' while adding one, null otherwise. */
  editing: string | null;
  setEditing: (cohortId: string | null) => void;
}) {
  const editable = canEdit && trial.status === 'draft';
  const editingCohort = trial.cohorts.find((c) => c.id === editing);
  return (
    <Panel
      title="Cohorts"
      actions={editable && editing === null && <Button variant="secondary" onClick={() => setEditing('new')}>Add a cohort</Button>}
    >
      <ul className="divide-y divide-ink-100 text-sm">
        {trial.cohorts.map((cohort) => (
          <li key={cohort.id} className="flex flex-wrap items-center gap-3 py-2">
            <span className="w-24 font-mono font-semibold">{cohort.code}</span>
            <span className="flex-1">{cohort.name}</span>
            <StatusTag status={cohort.status} />
            {editable && editing === null && (
              <Button variant="quiet" onClick={() => setEditing(cohort.id)} aria-label={`Rename cohort ${cohort.code}`}>
                Rename
              </Button>
            )}
          </li>
        ))}
      </ul>
      {editing !== null && <CohortForm trialId={trial.id} cohort={editingCohort} onDone={() => setEditing(null)} />}
      {canEdit && trial.status !== 'draft' && <p className="mt-2 text-xs text-ink-500">Cohorts are fixed once the trial has left the draft state.</p>}
    </Panel>
  );
}
