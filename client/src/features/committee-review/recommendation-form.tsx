/**
 * A committee member's recommendation on a data cut, signed electronically. Signing needs a fresh
 * sign-in: when the server asks for one, the form's state is kept in this tab, the member signs in
 * again at the identity provider, and the form comes back filled in to sign.
 */
import { Field, Form, Formik, useField } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { TextAreaField } from '../../components/field';
import { ApiError, reauthenticate } from '../../lib/api';
import {
  RECOMMENDATION_DECISIONS,
  RECOMMENDATION_LABELS,
  recommendationSchema,
  type RecommendationDecision,
} from '../../../../server/data-cuts/data-cuts.schema';
import { useSignRecommendation } from './use-sign-recommendation';

export const RECOMMENDATION_ICONS: Record<RecommendationDecision, string> = {
  continue: '▸',
  stop_futility: '■',
  stop_other: '⏹',
  modify_protocol: '✎',
  resume_accrual: '↻',
  stop_safety: '⊘',
};

type Values = { decision: RecommendationDecision | ''; rationale: string };

const draftKey = (cutId: string) => `orrery.recommendation-draft.${cutId}`;

function readDraft(cutId: string): Values | null {
  try {
    const raw = sessionStorage.getItem(draftKey(cutId));
    return raw ? (JSON.parse(raw) as Values) : null;
  } catch {
    return null;
  }
}

function DecisionChoices() {
  const [, meta] = useField('decision');
  const error = meta.touched && meta.error ? meta.error : undefined;
  return (
    <fieldset aria-describedby={error ? 'decision-error' : undefined}>
      <legend className="mb-1 text-xs font-semibold tracking-wide text-ink-700 uppercase">Recommendation</legend>
      <div className="grid gap-1 sm:grid-cols-2">
        {RECOMMENDATION_DECISIONS.map((decision) => (
          <label key={decision} className="flex items-center gap-2 rounded-sm border border-ink-200 px-3 py-2 text-sm has-[:checked]:border-ink-900 has-[:checked]:font-semibold">
            <Field type="radio" name="decision" value={decision} className="accent-ink-900" />
            <span aria-hidden>{RECOMMENDATION_ICONS[decision]}</span>
            {RECOMMENDATION_LABELS[decision]}
          </label>
        ))}
      </div>
      {error && (
        <p id="decision-error" role="alert" className="mt-1 text-xs font-medium text-alert-600">
          <span aria-hidden>⚠ </span>
          {error}
        </p>
      )}
    </fieldset>
  );
}

export function RecommendationForm({ cutId, trialId, meaning }: { cutId: string; trialId: string; meaning: string }) {
  const sign = useSignRecommendation(cutId, trialId);
  const draft = readDraft(cutId);
  return (
    <Formik<Values>
      initialValues={draft ?? { decision: '', rationale: '' }}
      initialTouched={draft ? { decision: true, rationale: true } : {}}
      validationSchema={recommendationSchema}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          await sign.mutateAsync({ decision: values.decision as RecommendationDecision, rationale: values.rationale });
          sessionStorage.removeItem(draftKey(cutId));
        } catch (error) {
          if (error instanceof ApiError && error.code === 'reauthentication_required') {
            sessionStorage.setItem(draftKey(cutId), JSON.stringify(values));
            reauthenticate();
            return;
          }
          if (error instanceof ApiError) helpers.setErrors(error.fields);
        }
      }}
    >
      {({ isSubmitting }) => (
        <Form className="grid gap-3" aria-label="Sign a recommendation">
          {draft && (
            <p role="status" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
              <span aria-hidden>↺ </span>You signed in again; your recommendation is as you left it. Review it and sign.
            </p>
          )}
          <DecisionChoices />
          <TextAreaField name="rationale" label="Rationale" rows={5} hint="What the committee saw and why it recommends this." />
          <p className="text-xs text-ink-600">
            Signing is an electronic signature: {meaning} You will be asked to confirm your identity if your sign-in is not recent.
          </p>
          <div>
            <Button type="submit" disabled={isSubmitting}>
              <span aria-hidden>✍</span> {isSubmitting ? 'Signing…' : 'Sign the recommendation'}
            </Button>
          </div>
          {sign.error && !(sign.error instanceof ApiError && (sign.error.code === 'reauthentication_required' || Object.keys(sign.error.fields).length > 0)) && (
            <ErrorNotice error={sign.error} title="The recommendation was not signed" />
          )}
        </Form>
      )}
    </Formik>
  );
}
