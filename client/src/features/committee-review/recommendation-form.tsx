/**
 * A committee member's recommendation on a data cut, signed electronically. Each signature needs
 * the member's password, entered at the identity provider for this cut: when the server asks for
 * it, the form's state is kept in this tab, the member enters the password and comes back to the
 * form filled in, reads the statement again and signs. The statement shown is the one recorded.
 */
import { Field, Form, Formik, useField } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { TextAreaField } from '../../components/field';
import { SigningNotice } from '../../components/signing-notice';
import { ApiError, confirmIdentityToSign, signingUrlOf } from '../../lib/api';
import {
  RECOMMENDATION_DECISIONS,
  RECOMMENDATION_LABELS,
  recommendationMeaning,
  recommendationSchema,
  type RecommendationDecision,
} from '../../../../server/data-cuts/data-cuts.schema';
import { useSigningReady } from '../auth';
import type { DataCut } from '../data-cuts';
import { useSignRecommendation } from './use-sign-recommendation';

export const RECOMMENDATION_ICONS: Record<RecommendationDecision, string> = {
  continue: '▸',
  stop_futility: '■',
  stop_other: '⏹',
  modify_protocol: '✎',
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

export function RecommendationForm({ cut, trialId }: { cut: DataCut; trialId: string }) {
  const sign = useSignRecommendation(cut.id, trialId);
  const ready = useSigningReady('recommendation', cut.id);
  const draft = readDraft(cut.id);
  return (
    <Formik<Values>
      initialValues={draft ?? { decision: '', rationale: '' }}
      initialTouched={draft ? { decision: true, rationale: true } : {}}
      validationSchema={recommendationSchema.omit(['analysisVersion'])}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          await sign.mutateAsync({ decision: values.decision as RecommendationDecision, rationale: values.rationale, analysisVersion: cut.version });
          sessionStorage.removeItem(draftKey(cut.id));
        } catch (error) {
          const signingUrl = signingUrlOf(error);
          if (signingUrl) {
            sessionStorage.setItem(draftKey(cut.id), JSON.stringify(values));
            confirmIdentityToSign(signingUrl);
            return;
          }
          if (error instanceof ApiError) helpers.setErrors(error.fields);
        }
      }}
    >
      {({ isSubmitting, values }) => (
        <Form className="grid gap-3" aria-label="Sign a recommendation">
          <SigningNotice ready={ready} />
          <DecisionChoices />
          <TextAreaField name="rationale" label="Rationale" rows={5} hint="What the committee saw and why it recommends this." />
          <blockquote className="border-l-4 border-brass-500 bg-brass-50 px-4 py-2 text-sm">
            <p className="text-xs font-semibold tracking-wide text-brass-700 uppercase">Meaning of your signature</p>
            <p>{values.decision ? recommendationMeaning(values.decision, cut) : 'Choose a recommendation to see the statement you sign.'}</p>
          </blockquote>
          <p className="text-xs text-ink-600">
            Signing is an electronic signature: you enter your password at the identity service for this signature, then sign here.
          </p>
          <div>
            <Button type="submit" disabled={isSubmitting} autoFocus={ready && draft !== null}>
              <span aria-hidden>✍</span> {isSubmitting ? 'Signing…' : ready ? 'Sign the recommendation' : 'Enter your password and sign'}
            </Button>
          </div>
          {sign.error && !(signingUrlOf(sign.error) || (sign.error instanceof ApiError && Object.keys(sign.error.fields).length > 0)) && (
            <ErrorNotice error={sign.error} title="The recommendation was not signed" />
          )}
        </Form>
      )}
    </Formik>
  );
}
