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
import { INTERIM_ACCRUAL_LABELS, POPULATION_LABELS } from '../../../../server/words';
import { useSignDesign } from './use-sign-design';
import { pendingReason, type StudioValues } from './url-state';
import { ruleText, SELECTION_LABELS, type CandidateDesign, type DesignSettings } from './types';

type Props = {
  trialId: string;
  trialCode: string;
  cohort: { id: string; code: string };
  candidate: CandidateDesign;
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
                  {SELECTION_LABELS[candidate.selection]} {ruleText(candidate)}
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
                <dt className="text-ink-500">EN0 / PET0</dt>
                <dd>
                  {decimal(candidate.en0, 1)} / {decimal(candidate.pet0, 2)}
                </dd>
                <dt className="text-ink-500">Analysis population</dt>
                <dd>{POPULATION[values.analysisPopulation]}</dd>
                <dt className="text-ink-500">Accrual at the interim</dt>
                <dd>{INTERIM[values.interimAccrual]}</dd>
                <dt className="text-ink-500">Sponsors see response figures</dt>
                <dd>{values.sponsorSeesResponse ? 'Yes' : 'Only after the committee releases them'}</dd>
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
