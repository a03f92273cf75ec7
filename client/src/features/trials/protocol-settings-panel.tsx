import { Form, Formik } from 'formik';
import { Button, ErrorNotice, Panel } from '../../components/ui';
import { CheckboxField, SelectField, TextAreaField, TextField } from '../../components/field';
import { protocolSettingsSchema } from '../../../../server/trials/trials.schema';
import { showServerError } from '../../lib/form-errors';
import type { ProtocolSettings, Trial } from './get-trial';
import { useUpdateProtocolSettings } from './use-update-protocol-settings';
import { GLYPHS, NE_BETWEEN_RESPONSES_LABELS, OUTCOME_SOURCE_LABELS } from '../../../../server/words';

const SOURCE_WORDS = OUTCOME_SOURCE_LABELS;
const NE_WORDS = NE_BETWEEN_RESPONSES_LABELS;

function SettingsList({ settings }: { settings: ProtocolSettings }) {
  return (
    <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[16rem_1fr]">
      <dt className="text-ink-500">Outcomes</dt>
      <dd>{SOURCE_WORDS[settings.outcomeSource]}</dd>
      <dt className="text-ink-500">Confirmation of CR/PR</dt>
      <dd>{settings.confirmationRequired ? `Required, at least ${settings.confirmationMinDays} days later` : 'Not required'}</dd>
      <dt className="text-ink-500">Stable disease counts after</dt>
      <dd className="tabular-nums">{settings.sdMinDays} days</dd>
      <dt className="text-ink-500">An NE between responses</dt>
      <dd>{NE_WORDS[settings.neBetweenResponses]}</dd>
      <dt className="text-ink-500">Assessment interval</dt>
      <dd className="tabular-nums">{settings.assessmentIntervalDays} days</dd>
      <dt className="text-ink-500">Inactivity warning after</dt>
      <dd className="tabular-nums">{settings.inactivityWarningWeeks} weeks</dd>
    </dl>
  );
}

/** The protocol's rules for outcomes: the statistician sets them; others read them. */
export function ProtocolSettingsPanel({ trial, canEdit }: { trial: Trial; canEdit: boolean }) {
  const update = useUpdateProtocolSettings(trial.id);
  const settings = trial.protocolSettings;
  return (
    <Panel title="Protocol settings for outcomes">
      {!canEdit ? (
        <SettingsList settings={settings} />
      ) : (
        <Formik
          initialValues={{ ...settings, reason: '', version: trial.version }}
          enableReinitialize
          validationSchema={protocolSettingsSchema}
          onSubmit={async (values, helpers) => {
            helpers.setStatus(undefined);
            try {
              await update.mutateAsync(protocolSettingsSchema.cast(values, { stripUnknown: true }));
              helpers.setStatus({ saved: true });
            } catch (error) {
              showServerError(error, helpers);
            }
          }}
        >
          {({ values, isSubmitting, status }) => (
            <Form noValidate className="grid gap-3">
              <SelectField name="outcomeSource" label="Outcomes are">
                {Object.entries(SOURCE_WORDS).map(([value, label]) => (
                  <option key={value} value={value}>
                    {label}
                  </option>
                ))}
              </SelectField>
              <CheckboxField name="confirmationRequired" label="A CR or PR needs a confirming assessment" />
              <div className="grid gap-3 sm:grid-cols-2">
                {values.confirmationRequired && <TextField name="confirmationMinDays" label="Confirmation at least (days)" type="number" min={1} />}
                <TextField name="sdMinDays" label="Stable disease counts after (days)" type="number" min={1} />
                <TextField name="assessmentIntervalDays" label="Assessment interval (days)" type="number" min={1} />
                <TextField name="inactivityWarningWeeks" label="Inactivity warning after (weeks)" type="number" min={1} />
              </div>
              <SelectField name="neBetweenResponses" label="An NE assessment between two responses">
                {Object.entries(NE_WORDS).map(([value, label]) => (
                  <option key={value} value={value}>
                    {label}
                  </option>
                ))}
              </SelectField>
              <TextAreaField name="reason" label="Reason for the change" hint="Required once patients are enrolled; kept in the audit trail." />
              {status?.saved && (
                <p role="status" className="text-sm text-good-700">
                  <span aria-hidden>{GLYPHS.done} </span>Protocol settings saved.
                </p>
              )}
              {status && !status.saved && <ErrorNotice error={status} title="The settings were not saved" />}
              <div>
                <Button type="submit" disabled={isSubmitting}>
                  {isSubmitting ? 'Saving…' : 'Save protocol settings'}
                </Button>
              </div>
            </Form>
          )}
        </Formik>
      )}
    </Panel>
  );
}
