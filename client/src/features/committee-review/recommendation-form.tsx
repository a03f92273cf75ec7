/**
 * A committee member's recommendation on a data cut, signed electronically. The signature's wording
 * is shown as the server will record it, with the choice filled in as it is made (one function words
 * it for both). "Continue to stage 2" is offered only where a stage 2 is still ahead. Signing needs a
 * fresh sign-in: when the server asks for one, the form's state is kept in this tab, the member signs
 * in again at the identity provider, and the form comes back filled in to sign.
 */
import { Field, Form, Formik, useField } from 'formik';
import { Button, DecisionCaution, ErrorNotice } from '../../components/ui';
import { TextAreaField } from '../../components/field';
import { ApiError, reauthenticate } from '../../lib/api';
import { recommendationChoices, recommendationSchema, type RecommendationDecision } from '../../../../server/data-cuts/data-cuts.schema';
import { DECISION_POINT_CAUTIONS, GLYPHS, RECOMMENDATION_WORDS, recommendationMeaning } from '../../../../server/words';
import type { DataCutDetail } from '../data-cuts';
import { useSignRecommendation } from './use-sign-recommendation';

type Cut = DataCutDetail['dataCut'];

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

function DecisionChoices({ choices }: { choices: RecommendationDecision[] }) {
  const [, meta] = useField('decision');
  const error = meta.touched && meta.error ? meta.error : undefined;
  return (
    <fieldset aria-describedby={error ? 'decision-error' : undefined}>
      <legend className="mb-1 text-xs font-semibold tracking-wide text-ink-700 uppercase">Recommendation</legend>
      <div className="grid gap-1 sm:grid-cols-2">
        {choices.map((decision) => (
          <label key={decision} className="flex items-center gap-2 rounded-sm border border-ink-200 px-3 py-2 text-sm has-[:checked]:border-ink-900 has-[:checked]:font-semibold">
            <Field type="radio" name="decision" value={decision} className="accent-ink-900" />
            <span aria-hidden>{RECOMMENDATION_WORDS[decision].glyph}</span>
            {RECOMMENDATION_WORDS[decision].label}
          </label>
        ))}
      </div>
      {error && (
        <p id="decision-error" role="alert" className="mt-1 text-xs font-medium text-alert-600">
          <span aria-hidden>{GLYPHS.warning} </span>
          {error}
        </p>
      )}
    </fieldset>
  );
}

export function RecommendationForm({ cut, trialId }: { cut: Cut; trialId: string }) {
  const cutId = cut.id;
  const sign = useSignRecommendation(cutId, trialId);
  const draft = readDraft(cutId);
  const choices = recommendationChoices(cut.snapshot.cohorts);
  const meaningOf = (decision: RecommendationDecision | '') =>
    recommendationMeaning({
      decision: decision || null,
      trialCode: cut.snapshot.trial.code,
      cohortCodes: cut.snapshot.cohorts.map((c) => c.code),
      cutSeq: cut.seq,
      cutId: cut.id,
    });
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
      {({ values, isSubmitting }) => (
        <Form className="grid gap-3" aria-label="Sign a recommendation">
          {draft && (
            <p role="status" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
              <span aria-hidden>{GLYPHS.restored} </span>You signed in again; your recommendation is as you left it. Review it and sign.
            </p>
          )}
          <DecisionChoices choices={choices} />
          <TextAreaField name="rationale" label="Rationale" rows={5} hint="What the committee saw and why it recommends this." />
          <div className="text-xs text-ink-600">
            <p>Signing is an electronic signature with this meaning, recorded word for word:</p>
            <blockquote aria-label="Meaning of the signature" className="my-1 border-l-2 border-ink-300 pl-2 text-sm text-ink-900">
              {meaningOf(values.decision)}
            </blockquote>
            <p>You will be asked to confirm your identity if your sign-in is not recent.</p>
          </div>
          <DecisionCaution>{DECISION_POINT_CAUTIONS.signRecommendation}</DecisionCaution>
          <div>
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Signing…' : 'Sign the recommendation'}
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
