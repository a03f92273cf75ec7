import { FieldArray, Form, Formik, getIn, type FormikHelpers } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { SelectField, TextAreaField, TextField } from '../../components/field';
import { DEFAULT_COHORT, trialCreateSchema, trialUpdateSchema } from '../../../../server/trials/trials.schema';
import { useSites } from '../people';
import type { Trial } from './get-trial';
import { GLYPHS } from '../../../../server/words';

export type TrialFormValues = {
  code: string;
  title: string;
  indication: string;
  endpointDefinition: string;
  sponsorName: string;
  plannedAccrualPerMonth: number | '';
  startDate: string;
  sites: Array<{ siteId: string; plannedAccrualPerMonth: number | '' }>;
  cohorts: Array<{ code: string; name: string }>;
  version: number;
};

export const trialFormValues = (trial?: Trial): TrialFormValues => ({
  code: trial?.code ?? '',
  title: trial?.title ?? '',
  indication: trial?.indication ?? '',
  endpointDefinition: trial?.endpointDefinition ?? 'Objective response (CR or PR) by RECIST 1.1',
  sponsorName: trial?.sponsorName ?? '',
  plannedAccrualPerMonth: trial?.plannedAccrualPerMonth ?? '',
  startDate: trial?.startDate ?? '',
  sites: (trial?.sites ?? []).map((s) => ({ siteId: s.id, plannedAccrualPerMonth: s.plannedAccrualPerMonth ?? '' })),
  cohorts: trial ? [] : [{ ...DEFAULT_COHORT }],
  version: trial?.version ?? 1,
});

/** A message for a whole list (e.g. "each site can be listed once"), not for one of its rows. */
function ListError({ errors, name }: { errors: unknown; name: string }) {
  const error = getIn(errors, name);
  return typeof error === 'string' ? (
    <p role="alert" className="text-xs font-medium text-alert-600">
      <span aria-hidden>{GLYPHS.warning} </span>
      {error}
    </p>
  ) : null;
}

/** The trial's record, its sites with their planned accrual and, for a new trial, its cohorts. */
export function TrialForm({
  trial,
  submitLabel,
  onSubmit,
}: {
  trial?: Trial;
  submitLabel: string;
  onSubmit: (values: TrialFormValues, helpers: FormikHelpers<TrialFormValues>) => Promise<void>;
}) {
  const { data: allSites = [] } = useSites();
  const creating = !trial;
  return (
    <Formik
      initialValues={trialFormValues(trial)}
      enableReinitialize
      validationSchema={creating ? trialCreateSchema : trialUpdateSchema}
      onSubmit={onSubmit}
    >
      {({ values, errors, isSubmitting, status }) => (
        <Form noValidate className="grid gap-4">
          <div className="grid gap-3 sm:grid-cols-[12rem_1fr]">
            <TextField name="code" label="Protocol code" hint="e.g. TSY-206" autoComplete="off" />
            <TextField name="title" label="Title" autoComplete="off" />
          </div>
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField name="indication" label="Indication" autoComplete="off" />
            <TextField name="sponsorName" label="Sponsor" autoComplete="organization" />
          </div>
          <TextAreaField name="endpointDefinition" label="Endpoint definition" hint="How a responder is defined, as the protocol says." />
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField name="plannedAccrualPerMonth" label="Planned accrual (patients per month, all sites)" type="number" min={0} step={1} inputMode="numeric" />
            <TextField name="startDate" label="Start date" type="date" />
          </div>

          <fieldset className="grid gap-2 border border-ink-100 p-3">
            <legend className="px-1 text-xs font-semibold tracking-wide text-ink-700 uppercase">Sites and planned accrual per site</legend>
            <FieldArray name="sites">
              {(sites) => (
                <>
                  {values.sites.length === 0 && <p className="text-sm text-ink-500">No sites yet. Add the sites that will enrol.</p>}
                  {values.sites.map((_, index) => (
                    <div key={index} className="grid items-end gap-2 sm:grid-cols-[1fr_12rem_auto]">
                      <SelectField name={`sites.${index}.siteId`} label={`Site ${index + 1}`}>
                        <option value="">Choose a site…</option>
                        {allSites.map((site) => (
                          <option key={site.id} value={site.id}>
                            {site.code} — {site.name} ({site.country})
                          </option>
                        ))}
                      </SelectField>
                      <TextField name={`sites.${index}.plannedAccrualPerMonth`} label="Per month" type="number" min={0} step={1} inputMode="numeric" />
                      <Button variant="quiet" onClick={() => sites.remove(index)} aria-label={`Remove site ${index + 1}`}>
                        Remove
                      </Button>
                    </div>
                  ))}
                  <ListError errors={errors} name="sites" />
                  <div>
                    <Button variant="secondary" onClick={() => sites.push({ siteId: '', plannedAccrualPerMonth: '' })}>
                      Add a site
                    </Button>
                  </div>
                </>
              )}
            </FieldArray>
          </fieldset>

          {creating && (
            <fieldset className="grid gap-2 border border-ink-100 p-3">
              <legend className="px-1 text-xs font-semibold tracking-wide text-ink-700 uppercase">Cohorts</legend>
              <p className="text-xs text-ink-500">Most trials have one cohort. A basket trial has one per tumour type, each with its own design and stopping rules.</p>
              <FieldArray name="cohorts">
                {(cohorts) => (
                  <>
                    {values.cohorts.map((_, index) => (
                      <div key={index} className="grid items-end gap-2 sm:grid-cols-[10rem_1fr_auto]">
                        <TextField name={`cohorts.${index}.code`} label={`Cohort ${index + 1} code`} autoComplete="off" />
                        <TextField name={`cohorts.${index}.name`} label="Name" autoComplete="off" />
                        <Button variant="quiet" disabled={values.cohorts.length === 1} onClick={() => cohorts.remove(index)} aria-label={`Remove cohort ${index + 1}`}>
                          Remove
                        </Button>
                      </div>
                    ))}
                    <ListError errors={errors} name="cohorts" />
                    <div>
                      <Button variant="secondary" onClick={() => cohorts.push({ code: '', name: '' })}>
                        Add a cohort (basket trial)
                      </Button>
                    </div>
                  </>
                )}
              </FieldArray>
            </fieldset>
          )}

          {status && <ErrorNotice error={status} title="The trial was not saved" />}
          <div>
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : submitLabel}
            </Button>
          </div>
        </Form>
      )}
    </Formik>
  );
}
