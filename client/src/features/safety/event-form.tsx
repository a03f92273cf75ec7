/**
 * Recording or correcting an adverse event: onset, the verbatim term, the CTCAE v5.0 grade with its
 * words, the attribution to the agent, seriousness, outcome and notes. A correction needs a reason;
 * grade and attribution may wait for the investigator ("not graded", "not assessed"). Validated as
 * you type by the schema the server uses, judged against the patient's enrolment.
 */
import { Form, Formik, yupToFormErrors, type FormikErrors } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { CheckboxField, SelectField, TextAreaField, TextField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { isoDay } from '../../lib/format';
import { showServerError } from '../../lib/form-errors';
import { ATTRIBUTIONS, CTCAE_GRADES, EVENT_OUTCOMES, eventSchema, type Attribution, type EventOutcome } from '../../../../server/safety/safety.schema';
import { CTCAE_SOURCE } from '../../../../server/words';
import { ATTRIBUTION_WORDS, EVENT_OUTCOME_WORDS, GRADE_WORDS } from './words';
import type { AdverseEvent } from './types';

type Values = { onsetOn: string; term: string; grade: string; attribution: string; serious: boolean; outcome: string; notes: string; reason: string };

const toValues = (e?: AdverseEvent): Values => ({
  onsetOn: e?.onsetOn ?? '',
  term: e?.term ?? '',
  grade: e?.grade === null || e?.grade === undefined ? '' : String(e.grade),
  attribution: e?.attribution ?? '',
  serious: e?.serious ?? false,
  outcome: e?.outcome ?? 'unknown',
  notes: e?.notes ?? '',
  reason: '',
});

export const toEventBody = (v: Values) => ({
  onsetOn: v.onsetOn,
  term: v.term,
  grade: v.grade === '' ? null : Number(v.grade),
  attribution: (v.attribution || null) as Attribution | null,
  serious: v.serious,
  outcome: v.outcome as EventOutcome,
  notes: v.notes || null,
});

type Props = {
  enrolledOn: string;
  /** The event being corrected; absent when recording a new one. */
  event?: AdverseEvent;
  submitLabel: string;
  onSubmit: (body: Record<string, unknown>) => Promise<unknown>;
  onCancel: () => void;
};

export function EventForm({ enrolledOn, event, submitLabel, onSubmit, onCancel }: Props) {
  const correcting = event !== undefined;
  const schema = eventSchema(enrolledOn);
  return (
    <Formik<Values>
      initialValues={toValues(event)}
      validateOnChange
      validate={async (values) => {
        let errors: FormikErrors<Values> = {};
        try {
          await schema.validate(toEventBody(values), { abortEarly: false });
        } catch (error) {
          errors = yupToFormErrors(error);
        }
        if (correcting && !values.reason.trim()) errors.reason = 'Give the reason for the correction.';
        return errors;
      }}
      onSubmit={async (values, helpers) => {
        try {
          await onSubmit(correcting ? { ...toEventBody(values), version: event.version, reason: values.reason } : toEventBody(values));
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form aria-label={correcting ? `Correct the adverse event ${event.term}` : 'Record an adverse event'} className="grid gap-3 border border-ink-100 bg-ink-50/40 p-3">
          <div className="grid gap-3 sm:grid-cols-3">
            <TextField name="onsetOn" label="Onset date" type="date" min={enrolledOn} max={isoDay(new Date())} hint={`On or after enrolment (${enrolledOn}).`} />
            <div className="sm:col-span-2">
              <TextField name="term" label="Event as reported (verbatim term)" hint="As the site recorded it, e.g. “febrile neutropenia”." />
            </div>
            <SelectField name="grade" label="CTCAE grade" hint={`Grade words: ${CTCAE_SOURCE}.`}>
              <option value="">Not graded yet</option>
              {CTCAE_GRADES.map((grade) => (
                <option key={grade} value={grade}>
                  {grade} · {GRADE_WORDS[grade]}
                </option>
              ))}
            </SelectField>
            <SelectField name="attribution" label="Attribution to the agent">
              <option value="">Not assessed yet</option>
              {ATTRIBUTIONS.map((a) => (
                <option key={a} value={a}>
                  {ATTRIBUTION_WORDS[a]}
                </option>
              ))}
            </SelectField>
            <SelectField name="outcome" label="Outcome">
              {EVENT_OUTCOMES.map((o) => (
                <option key={o} value={o}>
                  {EVENT_OUTCOME_WORDS[o]}
                </option>
              ))}
            </SelectField>
            <div className="sm:col-span-3">
              <CheckboxField name="serious" label="Serious adverse event" hint="Resulted in death, was life-threatening, required or prolonged hospitalisation, or caused lasting disability." />
            </div>
            <div className="sm:col-span-3">
              <TextAreaField name="notes" label="Notes" rows={2} />
            </div>
            {correcting && (
              <div className="sm:col-span-3">
                <TextAreaField name="reason" label="Reason for the correction" rows={2} hint="Kept in the audit trail with the values before and after." />
              </div>
            )}
          </div>
          <div className="flex gap-2">
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : submitLabel}
            </Button>
            <Button variant="secondary" onClick={onCancel}>
              Cancel
            </Button>
          </div>
          {status instanceof ApiError && Object.keys(status.fields).length === 0 && <ErrorNotice error={status} title="The adverse event was not saved" />}
        </Form>
      )}
    </Formik>
  );
}
