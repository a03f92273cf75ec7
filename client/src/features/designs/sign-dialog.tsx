/**
 * Signing a design: what is signed, the meaning of the signature in words (the text recorded), the
 * reason for a new version, and an explicit confirmation. Each signature needs the statistician's
 * password, entered at the identity provider for this cohort's design: the dialog sends them there
 * and they come back to this same dialog to sign.
 */
import { useEffect, useRef } from 'react';
import { Form, Formik } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { CheckboxField, TextAreaField } from '../../components/field';
import { decimal } from '../../lib/format';
import { SigningNotice } from '../../components/signing-notice';
import { confirmIdentityToSign, signingUrlOf } from '../../lib/api';
import { useSigningReady } from '../auth';
import {
  designAmendmentSchema,
  designLockSchema,
  signatureMeaning,
  type SignatureKind,
} from '../../../../server/designs/designs.schema';
import { INTERIM_ACCRUAL_LABELS, POPULATION_LABELS, SAFETY_RULE_WORDS, toxicityDefinitionSentence } from '../../../../server/words';
import { useSignDesign } from './use-sign-design';
import { pendingReason, type StudioValues } from './url-state';
import { ruleText, SELECTION_LABELS, type BryantDayDesign, type CandidateDesign, type DesignSettings } from './types';

type Props = {
  trialId: string;
  trialCode: string;
  cohort: { id: string; code: string };
  candidate: CandidateDesign & { bryantDay?: BryantDayDesign };
  settings: DesignSettings;
  values: StudioValues;
  kind: SignatureKind;
  currentVersion: number;
  /** Where to come back after a fresh sign-in, with this dialog reopened. */
  returnTo: string;
  onClose: () => void;
  onSigned: () => void;
};

const POPULATION = POPULATION_LABELS;
const INTERIM = INTERIM_ACCRUAL_LABELS;

/** The safety rule's part of the body: only the fields its rule uses. */
function safetyFields(values: StudioValues) {
  const { safetyRule } = values;
  return {
    safetyRule,
    ...(safetyRule !== 'none' ? { toxMinGrade: values.toxMinGrade, toxWindowDays: values.toxWindowDays } : {}),
    ...(safetyRule === 'toxicity_boundary' ? { toxTheta: values.toxTheta, toxAlpha: values.toxAlpha } : {}),
    ...(safetyRule === 'bryant_day' ? { toxAcceptable: values.toxAcceptable, toxUnacceptable: values.toxUnacceptable, alphaT: values.alphaT } : {}),
  };
}

/** What the signed safety rule says, for the summary above the signature. */
function SafetySummary({ values, candidate }: { values: StudioValues; candidate: CandidateDesign & { bryantDay?: BryantDayDesign } }) {
  if (values.safetyRule === 'none') return null;
  const d = candidate.bryantDay;
  return (
    <>
      <dt className="text-ink-500">Safety rule</dt>
      <dd>{SAFETY_RULE_WORDS[values.safetyRule]}</dd>
      <dt className="text-ink-500">Toxicity</dt>
      <dd>{toxicityDefinitionSentence({ minGrade: Number(values.toxMinGrade), windowDays: Number(values.toxWindowDays) })}</dd>
      {values.safetyRule === 'toxicity_boundary' && (
        <>
          <dt className="text-ink-500">Boundary θ / α</dt>
          <dd>
            {values.toxTheta} / {values.toxAlpha}, over the design’s n = {candidate.n}
          </dd>
        </>
      )}
      {d && (
        <>
          <dt className="text-ink-500">Toxicity cut-offs</dt>
          <dd>
            stop after stage 1 with more than t1 = {d.t1} of {d.n1}; promising only with at most t = {d.t} of {d.n}
          </dd>
          <dt className="text-ink-500">Toxicity rates / αT</dt>
          <dd>
            {values.toxAcceptable} / {values.toxUnacceptable} · αT {values.alphaT} (attained {decimal(d.alphaT, 4)})
          </dd>
        </>
      )}
    </>
  );
}

export function SignDialog({ trialId, trialCode, cohort, candidate, settings, values, kind, currentVersion, returnTo, onClose, onSigned }: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  const sign = useSignDesign(trialId, cohort.id, kind === 'amendment' ? 'amendment' : 'lock');
  const ready = useSigningReady(kind === 'amendment' ? 'amendment' : 'design', cohort.id);
  const version = currentVersion + 1;
  const needsReason = kind !== 'lock';
  const meaning = signatureMeaning({ kind, version, protocolReference: values.protocolReference, trialCode, cohortCode: cohort.code });
  const schema = (needsReason ? designAmendmentSchema : designLockSchema).pick(['reason', 'confirmMeaning']);

  useEffect(() => {
    const node = dialog.current;
    if (node && !node.open) node.showModal();
    return () => node?.close();
  }, []);

  return (
    <dialog
      ref={dialog}
      aria-labelledby="sign-title"
      onCancel={(event) => {
        event.preventDefault();
        onClose();
      }}
      className="m-auto w-full max-w-2xl border border-ink-300 bg-white p-0 text-ink-900 backdrop:bg-ink-950/50"
    >
      <Formik
        initialValues={{ reason: pendingReason.read(cohort.id), confirmMeaning: false }}
        validationSchema={schema}
        onSubmit={async (form) => {
          const body = {
            ...settings,
            analysisPopulation: values.analysisPopulation,
            interimAccrual: values.interimAccrual,
            sponsorSeesResponse: values.sponsorSeesResponse,
            protocolReference: values.protocolReference,
            selection: candidate.selection,
            admissibleIndex: candidate.admissibleIndex,
            ...safetyFields(values),
            confirmMeaning: form.confirmMeaning,
            reason: needsReason ? form.reason : null,
            basedOnVersion: currentVersion,
          };
          try {
            await sign.mutateAsync(body);
            pendingReason.clear(cohort.id);
            onSigned();
          } catch (error) {
            const signingUrl = signingUrlOf(error);
            if (signingUrl) {
              pendingReason.save(cohort.id, form.reason);
              confirmIdentityToSign(signingUrl, returnTo);
            }
          }
        }}
      >
        {({ isSubmitting }) => (
          <Form noValidate>
            <header className="border-b border-ink-100 px-5 py-3">
              <h2 id="sign-title" className="text-lg font-semibold">
                {kind === 'amendment' ? `Sign an amendment: design version ${version}` : kind === 'revision' ? `Sign design version ${version}` : 'Lock and sign the design'}
              </h2>
              <p className="text-sm text-ink-500">
                {trialCode}, cohort {cohort.code}. This is an electronic signature: you enter your password at the identity service for it.
              </p>
            </header>
            <div className="grid gap-4 px-5 py-4">
              <SigningNotice ready={ready} />
              <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1 text-sm tabular-nums">
                <dt className="text-ink-500">Design</dt>
                <dd className="font-semibold">
                  {candidate.bryantDay ? candidate.label : SELECTION_LABELS[candidate.selection]} {ruleText(candidate)}
                </dd>
                <dt className="text-ink-500">p0 / p1</dt>
                <dd>
                  {settings.p0} / {settings.p1}
                </dd>
                <dt className="text-ink-500">α / β (nmax)</dt>
                <dd>
                  {settings.alpha} / {settings.beta} ({settings.nmax})
                </dd>
                <dt className="text-ink-500">Exact type I error / power</dt>
                <dd>
                  {decimal(candidate.typeIError, 4)} / {decimal(candidate.power, 4)}
                </dd>
                <dt className="text-ink-500">{candidate.bryantDay ? 'EN poor response / high toxicity' : 'EN0 / PET0'}</dt>
                <dd>
                  {candidate.bryantDay
                    ? `${decimal(candidate.bryantDay.expectedN.poorResponse, 1)} / ${decimal(candidate.bryantDay.expectedN.highToxicity, 1)}`
                    : `${decimal(candidate.en0, 1)} / ${decimal(candidate.pet0, 2)}`}
                </dd>
                <dt className="text-ink-500">Analysis population</dt>
                <dd>{POPULATION[values.analysisPopulation]}</dd>
                <dt className="text-ink-500">Accrual at the interim</dt>
                <dd>{INTERIM[values.interimAccrual]}</dd>
                <dt className="text-ink-500">Sponsors see response figures</dt>
                <dd>{values.sponsorSeesResponse ? 'Yes' : 'Only after the committee releases them'}</dd>
                <SafetySummary values={values} candidate={candidate} />
              </dl>
              <blockquote className="border-l-4 border-brass-500 bg-brass-50 px-4 py-2 text-sm">
                <p className="text-xs font-semibold tracking-wide text-brass-700 uppercase">Meaning of your signature</p>
                <p>{meaning}</p>
              </blockquote>
              {needsReason && (
                <TextAreaField
                  name="reason"
                  label={kind === 'amendment' ? 'Reason for the amendment' : 'Reason for the new version'}
                  hint="Recorded in the audit trail and shown with the version."
                />
              )}
              <CheckboxField name="confirmMeaning" label="I sign with the meaning stated above." />
              {sign.error && !signingUrlOf(sign.error) && (
                <ErrorNotice error={sign.error} title="The design was not signed" />
              )}
            </div>
            <footer className="flex justify-end gap-2 border-t border-ink-100 px-5 py-3">
              <Button variant="secondary" onClick={onClose}>
                Cancel
              </Button>
              <Button type="submit" disabled={isSubmitting}>
                {isSubmitting ? 'Signing…' : ready ? 'Sign' : 'Enter your password and sign'}
              </Button>
            </footer>
          </Form>
        )}
      </Formik>
    </dialog>
  );
}
