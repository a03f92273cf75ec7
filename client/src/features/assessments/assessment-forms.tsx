/**
 * The forms of the assessments panel: add an assessment, correct one (with a reason), remove one
 * (with a reason). Each validates with the server's own schema as you type and shows the server's
 * field messages when it still refuses.
 */
import { Form, Formik } from 'formik';
import { ApiError } from '../../lib/api';
import { showServerError } from '../../lib/form-errors';
import { useInvalidate } from '../../lib/invalidate';
import { Button, ErrorNotice } from '../../components/ui';
import { SelectField, TextAreaField, TextField } from '../../components/field';
import {
  NOTES_MAX,
  RESPONSE_LABELS,
  TIMEPOINT_RESPONSES,
  assessmentCorrectionSchema,
  assessmentRemovalSchema,
  assessmentSchema,
  latestToday,
} from '../../../../server/assessments/assessments.schema';
import { assessmentKeys } from './query-keys';
import { useAddAssessment } from './use-add-assessment';
import { useCorrectAssessment } from './use-correct-assessment';
import { useRemoveAssessment } from './use-remove-assessment';
import type { Assessment } from './types';

/** A stale version (409) means someone else changed the record: reload it so the form shows theirs. */
function useReloadOnConflict(trialId: string, patientId: string) {
  const invalidate = useInvalidate();
  return (error: unknown) => {
    if (error instanceof ApiError && error.status === 409) void invalidate(assessmentKeys.patient(trialId, patientId));
  };
}

function ResponseOptions() {
  return (
    <>
      <option value="">Choose…</option>
      {TIMEPOINT_RESPONSES.map((r) => (
        <option key={r} value={r}>
          {RESPONSE_LABELS[r]}
        </option>
      ))}
    </>
  );
}

type Ids = { trialId: string; patientId: string; enrolledOn: string };

export function AddAssessmentForm({ trialId, patientId, enrolledOn }: Ids) {
  const add = useAddAssessment(trialId, patientId);
  return (
    <Formik
      initialValues={{ date: '', response: '', notes: '' }}
      validationSchema={assessmentSchema(enrolledOn)}
      onSubmit={async (values, helpers) => {
        try {
          await add.mutateAsync({ date: values.date, response: values.response as Assessment['response'], notes: values.notes || null });
          helpers.resetForm();
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form aria-label="Add an assessment" className="grid gap-3 sm:grid-cols-[10rem_14rem_1fr_auto] sm:items-start">
          <AssessmentFields enrolledOn={enrolledOn} notesLabel="Notes (optional)" />
          <div className="sm:pt-5">
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : 'Add assessment'}
            </Button>
          </div>
          {status && (
            <div className="sm:col-span-4">
              <ErrorNotice error={status} title="The assessment was not saved" />
            </div>
          )}
        </Form>
      )}
    </Formik>
  );
}

export function CorrectAssessmentForm({ trialId, patientId, enrolledOn, assessment, onDone }: Ids & { assessment: Assessment; onDone: () => void }) {
  const correct = useCorrectAssessment(trialId, patientId);
  const reload = useReloadOnConflict(trialId, patientId);
  return (
    <Formik
      initialValues={{ date: assessment.date, response: assessment.response, notes: assessment.notes ?? '', version: assessment.version, reason: '' }}
      validationSchema={assessmentCorrectionSchema(enrolledOn)}
      enableReinitialize
      onSubmit={async (values, helpers) => {
        try {
          await correct.mutateAsync({
            id: assessment.id,
            version: values.version,
            reason: values.reason,
            ...(values.date !== assessment.date ? { date: values.date } : {}),
            ...(values.response !== assessment.response ? { response: values.response } : {}),
            ...((values.notes || null) !== assessment.notes ? { notes: values.notes || null } : {}),
          });
          onDone();
        } catch (error) {
          reload(error);
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form aria-label="Correct the assessment" className="grid gap-3 border-l-2 border-brass-500 bg-ink-50 p-3 sm:grid-cols-3">
          <AssessmentFields enrolledOn={enrolledOn} notesLabel="Notes" />
          <div className="sm:col-span-3">
            <TextAreaField name="reason" label="Reason for the correction" hint="Kept in the audit trail with the values before and after." />
          </div>
          <div className="flex gap-2 sm:col-span-3">
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : 'Save correction'}
            </Button>
            <Button variant="secondary" onClick={onDone}>
              Cancel
            </Button>
          </div>
          {status && (
            <div className="sm:col-span-3">
              <ErrorNotice error={status} title="The correction was not saved" />
            </div>
          )}
        </Form>
      )}
    </Formik>
  );
}

export function RemoveAssessmentForm({ trialId, patientId, assessment, onDone }: Omit<Ids, 'enrolledOn'> & { assessment: Assessment; onDone: () => void }) {
  const remove = useRemoveAssessment(trialId, patientId);
  const reload = useReloadOnConflict(trialId, patientId);
  return (
    <Formik
      initialValues={{ version: assessment.version, reason: '' }}
      validationSchema={assessmentRemovalSchema}
      onSubmit={async (values, helpers) => {
        try {
          await remove.mutateAsync({ id: assessment.id, ...values });
          onDone();
        } catch (error) {
          reload(error);
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form aria-label="Remove the assessment" className="grid gap-3 border-l-2 border-alert-600 bg-alert-50 p-3">
          <p className="text-sm">
            Remove the {assessment.response} assessment of {assessment.date}? The best overall response is derived again without it.
          </p>
          <TextAreaField name="reason" label="Reason for removing it" hint="Kept in the audit trail with the removed values." />
          <div className="flex gap-2">
            <Button type="submit" variant="danger" disabled={isSubmitting}>
              {isSubmitting ? 'Removing…' : 'Remove assessment'}
            </Button>
            <Button variant="secondary" onClick={onDone}>
              Cancel
            </Button>
          </div>
          {status && <ErrorNotice error={status} title="The assessment was not removed" />}
        </Form>
      )}
    </Formik>
  );
}

/** The three fields an assessment has, the same when adding one and when correcting it. */
function AssessmentFields({ enrolledOn, notesLabel }: { enrolledOn: string; notesLabel: string }) {
  return (
    <>
      <TextField name="date" label="Assessment date" type="date" min={enrolledOn} max={latestToday()} />
      <SelectField name="response" label="Overall timepoint response">
        <ResponseOptions />
      </SelectField>
      <TextField name="notes" label={notesLabel} maxLength={NOTES_MAX} />
    </>
  );
}
