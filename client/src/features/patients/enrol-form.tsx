/**
 * Enrolling at the end of a clinic day: the study ID field has the focus and the site's prefix,
 * the date is today, Enter saves, and the form stays open for the next patient.
 */
import { useState } from 'react';
import { Form, Formik } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { SelectField, TextField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { isoDay } from '../../lib/format';
import { showServerError } from '../../lib/form-errors';
import { enrolSchema, type EnrolInput } from '../../../../server/patients/patients.schema';
import { useEnrolPatient, type EnrolResult } from './use-enrol-patient';
import type { TrialCohort, TrialSite } from './types';
import { GLYPHS } from '../../../../server/words';

const ENROLLING = ['enrolling_stage_1', 'enrolling_stage_2', 'interim_review'];

export function EnrolForm({ trialId, sites, cohorts, onClose }: { trialId: string; sites: TrialSite[]; cohorts: TrialCohort[]; onClose: () => void }) {
  const enrol = useEnrolPatient(trialId);
  const [last, setLast] = useState<EnrolResult | null>(null);
  const open = cohorts.filter((c) => ENROLLING.includes(c.status));
  const initial: EnrolInput = {
    studyId: sites.length ? `${sites[0].code}-` : '',
    siteId: sites[0]?.id ?? '',
    cohortId: cohorts.length === 1 ? cohorts[0].id : (open[0]?.id ?? ''),
    enrolledOn: isoDay(new Date()),
  };
  return (
    <Formik<EnrolInput>
      initialValues={initial}
      validationSchema={enrolSchema}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          const result = await enrol.mutateAsync(values);
          setLast(result);
          const site = sites.find((s) => s.id === values.siteId);
          helpers.resetForm({ values: { ...values, studyId: site ? `${site.code}-` : '' } });
          document.getElementById('studyId')?.focus();
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status, values, setFieldValue }) => (
        <Form aria-label="Enrol a patient" className="grid gap-3">
          <div className="grid gap-3 sm:grid-cols-4">
            <TextField name="studyId" label="Study ID" autoFocus autoComplete="off" spellCheck={false} hint="Site code, a dash and a number" />
            <SelectField
              name="siteId"
              label="Site"
              onChange={(e) => {
                const site = sites.find((s) => s.id === e.target.value);
                void setFieldValue('siteId', e.target.value);
                if (site && !values.studyId.toUpperCase().startsWith(`${site.code}-`)) void setFieldValue('studyId', `${site.code}-`);
              }}
            >
              {sites.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.code} — {s.name}
                </option>
              ))}
            </SelectField>
            {cohorts.length > 1 && (
              <SelectField name="cohortId" label="Cohort">
                <option value="">Choose…</option>
                {cohorts.map((c) => (
                  <option key={c.id} value={c.id} disabled={!ENROLLING.includes(c.status)}>
                    {c.code} — {c.name}
                    {ENROLLING.includes(c.status) ? '' : ' (not enrolling)'}
                  </option>
                ))}
              </SelectField>
            )}
            <TextField name="enrolledOn" label="Enrolment date" type="date" max={isoDay(new Date())} />
          </div>
          <div className="flex flex-wrap items-center gap-2">
            <Button type="submit" disabled={isSubmitting}>
              <span aria-hidden>+</span> {isSubmitting ? 'Enrolling…' : 'Enrol'}
            </Button>
            <Button variant="quiet" onClick={onClose}>
              Close
            </Button>
            {last && (
              <p role="status" className="text-sm text-ink-700">
                <span aria-hidden>{GLYPHS.done} </span>
                {last.patient.studyId} enrolled in stage {last.patient.stage}.
              </p>
            )}
          </div>
          {last?.accrual.paused && (
            <p role="alert" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
              <span aria-hidden>{GLYPHS.paused} </span>Stage 1 is now complete: accrual is paused for the interim review. The statistician and the committee have been told by e-mail.
            </p>
          )}
          {last?.accrual.continuesAtRisk && (
            <p role="status" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
              <span aria-hidden>{GLYPHS.enrollingStage1} </span>Stage 1 is now complete and goes to interim review; the protocol lets accrual continue at risk.
            </p>
          )}
          {status instanceof ApiError && Object.keys(status.fields).length === 0 && <ErrorNotice error={status} title="The patient was not enrolled" />}
        </Form>
      )}
    </Formik>
  );
}
