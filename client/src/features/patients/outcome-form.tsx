/**
 * Recording or correcting an outcome. The choices follow RECIST 1.1 (a responder is CR or PR);
 * once an outcome is on record, any change is a correction and the reason field appears. A stale
 * version shows what changed and lets the user reload or keep their entry.
 */
import { useEffect, useRef, useState } from 'react';
import { Form, Formik, yupToFormErrors, type FormikErrors, type FormikProps } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { CheckboxField, SelectField, TextAreaField, TextField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { isoDay } from '../../lib/format';
import { showServerError } from '../../lib/form-errors';
import { OUTCOME_FIELDS, OUTCOMES, RESPONSES_FOR, isRecorded, outcomeSchema, type BestOverallResponse, type Outcome, type OutcomeInput } from '../../../../server/patients/patients.schema';
import { useRecordOutcome, type OutcomeResult } from './use-record-outcome';
import { ConflictView } from './conflict-view';
import type { Patient } from './types';
import { OUTCOME_WORDS, RESPONSE_WORDS } from './words';
import { GLYPHS } from '../../../../server/words';

type Values = {
  version: number;
  outcome: Outcome;
  bestOverallResponse: string;
  responseAssessedOn: string;
  evaluable: boolean;
  notEvaluableReason: string;
  reason: string;
};

const toValues = (p: Patient): Values => ({
  version: p.version,
  outcome: p.outcome,
  bestOverallResponse: p.bestOverallResponse ?? '',
  responseAssessedOn: p.responseAssessedOn ?? '',
  evaluable: p.evaluable,
  notEvaluableReason: p.notEvaluableReason ?? '',
  reason: '',
});

const toInput = (v: Values): OutcomeInput => ({
  version: v.version,
  outcome: v.outcome,
  bestOverallResponse: (v.bestOverallResponse || null) as BestOverallResponse | null,
  responseAssessedOn: v.responseAssessedOn || null,
  evaluable: v.evaluable,
  notEvaluableReason: v.evaluable ? null : v.notEvaluableReason || null,
  reason: v.reason || null,
});

const differs = (v: Values, p: Patient) => {
  const input = toInput(v);
  return OUTCOME_FIELDS.some((field) => input[field] !== p[field]);
};

/** `derived`: the protocol derives outcomes from timepoint assessments, so only evaluability is entered here. */
export function OutcomeForm({ trialId, patient, canWrite, derived = false }: { trialId: string; patient: Patient; canWrite: boolean; derived?: boolean }) {
  const record = useRecordOutcome(trialId, patient.id);
  const [base, setBase] = useState(patient);
  const [conflict, setConflict] = useState<{ mine: Values; current: Patient } | null>(null);
  const [saved, setSaved] = useState<OutcomeResult | null>(null);
  const recorded = isRecorded(base);
  const form = useRef<FormikProps<Values>>(null);

  // A newer version arrived (an attestation, another user's save): take it unless the user is mid-edit.
  // Only newer: after a reload from a conflict or a save, the prop is older until its query refetches.
  useEffect(() => {
    if (patient.version > base.version && !form.current?.dirty) {
      setBase(patient);
      form.current?.resetForm({ values: toValues(patient) });
    }
  }, [patient, base.version]);

  return (
    <Formik<Values>
      innerRef={form}
      initialValues={toValues(base)}
      validateOnChange
      validate={async (values) => {
        let errors: FormikErrors<Values> = {};
        try {
          await outcomeSchema.validate(toInput(values), { abortEarly: false, context: { enrolledOn: base.enrolledOn } });
        } catch (error) {
          errors = yupToFormErrors(error);
        }
        if (recorded && differs(values, base) && !values.reason.trim()) errors.reason = 'Changing a recorded outcome is a correction: give the reason.';
        return errors;
      }}
      onSubmit={async (values, helpers) => {
        setSaved(null);
        try {
          const result = await record.mutateAsync(toInput(values));
          setSaved(result);
          setBase(result.patient);
          helpers.resetForm({ values: toValues(result.patient) });
        } catch (error) {
          if (error instanceof ApiError && error.status === 409 && error.details.current) {
            setConflict({ mine: values, current: error.details.current as Patient });
            return;
          }
          showServerError(error, helpers);
        }
      }}
    >
      {({ values, setFieldValue, isSubmitting, status, resetForm, dirty }) => {
        const allowed = RESPONSES_FOR[values.outcome] ?? [];
        const correcting = recorded && differs(values, base);
        return (
          <Form aria-label={`Outcome of ${patient.studyId}`} className="grid gap-3">
            <fieldset disabled={!canWrite} className="grid gap-3 sm:grid-cols-3">
              {derived && (
                <p className="text-xs text-ink-600 sm:col-span-3">
                  <span aria-hidden>{GLYPHS.note} </span>This protocol derives the outcome from the timepoint assessments below: record or correct an assessment to change it.
                </p>
              )}
              <SelectField
                name="outcome"
                label="Outcome"
                disabled={derived}
                onChange={(e) => {
                  const next = e.target.value as Outcome;
                  void setFieldValue('outcome', next);
                  if (!RESPONSES_FOR[next].includes(values.bestOverallResponse as never)) void setFieldValue('bestOverallResponse', '');
                  if (next === 'pending') void setFieldValue('responseAssessedOn', '');
                }}
              >
                {OUTCOMES.map((o) => (
                  <option key={o} value={o}>
                    {OUTCOME_WORDS[o].label}
                  </option>
                ))}
              </SelectField>
              <SelectField name="bestOverallResponse" label="Best overall response" disabled={derived || values.outcome === 'pending'}>
                <option value="">{values.outcome === 'pending' ? 'Not yet' : 'Choose…'}</option>
                {allowed.map((r) => (
                  <option key={r} value={r}>
                    {RESPONSE_WORDS[r]}
                  </option>
                ))}
              </SelectField>
              <TextField name="responseAssessedOn" label="Date of the response assessment" type="date" min={base.enrolledOn} max={isoDay(new Date())} disabled={derived || values.outcome === 'pending'} />
              <div className="sm:col-span-3">
                <CheckboxField name="evaluable" label="Evaluable" hint="Untick when the patient cannot be assessed for response; give the reason." />
              </div>
              {!values.evaluable && (
                <div className="sm:col-span-3">
                  <TextField name="notEvaluableReason" label="Reason not evaluable" />
                </div>
              )}
              {correcting && (
                <div className="sm:col-span-3">
                  <TextAreaField name="reason" label="Reason for the correction" rows={2} hint="Kept in the audit trail with the values before and after." />
                </div>
              )}
            </fieldset>
            {conflict && (
              <ConflictView
                mine={toInput(conflict.mine)}
                loaded={base}
                current={conflict.current}
                onReload={() => {
                  setBase(conflict.current);
                  resetForm({ values: toValues(conflict.current) });
                  setConflict(null);
                }}
                onKeepMine={() => {
                  setBase(conflict.current);
                  resetForm({ values: { ...conflict.mine, version: conflict.current.version } });
                  setConflict(null);
                }}
              />
            )}
            {canWrite && (
              <div className="flex flex-wrap items-center gap-2">
                <Button type="submit" disabled={isSubmitting || !dirty}>
                  {isSubmitting ? 'Saving…' : correcting ? 'Save the correction' : 'Save the outcome'}
                </Button>
                {patient.attested && correcting && (
                  <span className="text-xs text-ink-600">
                    <span aria-hidden>{GLYPHS.done} </span>This outcome is attested; saving a change clears the attestation.
                  </span>
                )}
              </div>
            )}
            {saved && (
              <p role="status" className="text-sm text-ink-700">
                <span aria-hidden>{GLYPHS.done} </span>
                {saved.changed ? (saved.correction ? 'Correction saved.' : 'Outcome saved.') : 'Nothing changed.'}
                {saved.attestationCleared && ' The attestation was cleared: the site investigator needs to attest the outcome again.'}
                {saved.accrual.paused && ' Stage 1 is now complete: accrual is paused for the interim review.'}
              </p>
            )}
            {status instanceof ApiError && Object.keys(status.fields).length === 0 && <ErrorNotice error={status} title="The outcome was not saved" />}
          </Form>
        );
      }}
    </Formik>
  );
}
