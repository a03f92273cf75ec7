/**
 * A committee member's recommendation on a data cut, signed electronically. Each signature needs
 * the member's password, entered at the identity provider for this cut: when the server asks for
 * it, the form's state is kept in this tab, the member enters the password and comes back to the
 * form filled in, reads the statement again and signs. The statement shown is the one recorded
 * (one function words it for both), with the choice filled in as it is made. "Continue to stage 2"
 * is offered only where a stage 2 is still ahead.
 */
import { Field, Form, Formik, useField } from 'formik';
import { Button, DecisionCaution, ErrorNotice } from '../../components/ui';
import { TextAreaField } from '../../components/field';
import { SigningNotice } from '../../components/signing-notice';
import { ApiError, confirmIdentityToSign, signingUrlOf } from '../../lib/api';
import { recommendationChoices, recommendationSchema, type RecommendationDecision } from '../../../../server/data-cuts/data-cuts.schema';
import { DECISION_POINT_CAUTIONS, GLYPHS, RECOMMENDATION_WORDS, recommendationMeaning } from '../../../../server/words';
import { useSigningReady } from '../auth';
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
  const sign = useSignRecommendation(cut.id, trialId);
  const ready = useSigningReady('recommendation', cut.id);
  const draft = readDraft(cut.id);
  const choices = recommendationChoices(cut.snapshot.cohorts);
  const meaningOf = (decision: RecommendationDecision | '') =>
    recommendationMeaning({
      decision: decision || null,
      trialCode: cut.snapshot.trial.code,
      cohortCodes: cut.snapshot.cohorts.map((c) => c.code),
      cutSeq: cut.seq,
      cutId: cut.id,
      analysisVersion: cut.version,
    });
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
      {({ values, isSubmitting }) => (
        <Form className="grid gap-3" aria-label="Sign a recommendation">
          <SigningNotice ready={ready} />
          <DecisionChoices choices={choices} />
          <TextAreaField name="rationale" label="Rationale" rows={5} hint="What the committee saw and why it recommends this." />
          <div className="text-xs text-ink-600">
            <p>Signing is an electronic signature with this meaning, recorded word for word:</p>
            <blockquote aria-label="Meaning of the signature" className="my-1 border-l-2 border-ink-300 pl-2 text-sm text-ink-900">
              {meaningOf(values.decision)}
            </blockquote>
            <p>You enter your password at the identity service for this signature, then sign here.</p>
          </div>
          <DecisionCaution>{DECISION_POINT_CAUTIONS.signRecommendation}</DecisionCaution>
          <div>
            <Button type="submit" disabled={isSubmitting} autoFocus={ready && draft !== null}>
              {isSubmitting ? 'Signing…' : ready ? 'Sign the recommendation' : 'Enter your password and sign'}
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
