/**
 * The site investigator's attestation: an electronic signature over the recorded outcome. Each
 * attestation needs the investigator's password, entered at the identity provider for this
 * patient: when the server asks for it, the intent is kept in this tab, the investigator enters
 * the password and comes back here to sign. The statement shown is the one recorded.
 */
import { useState } from 'react';
import { Button, ErrorNotice } from '../../components/ui';
import { SigningNotice } from '../../components/signing-notice';
import { confirmIdentityToSign, signingUrlOf } from '../../lib/api';
import { dateTime } from '../../lib/format';
import { attestationMeaning } from '../../../../server/patients/patients.schema';
import { useSigningReady } from '../auth';
import { useAttestOutcome } from './use-attest-outcome';
import type { Patient } from './types';
import { GLYPHS } from '../../../../server/words';

const resumeKey = (patientId: string) => `orrery.attest-resume.${patientId}`;

export function AttestationPanel({ trialId, patient, canAttest }: { trialId: string; patient: Patient; canAttest: boolean }) {
  const attest = useAttestOutcome(trialId, patient.id);
  const ready = useSigningReady('attestation', patient.id);
  const [resuming, setResuming] = useState(() => sessionStorage.getItem(resumeKey(patient.id)) !== null);
  const meaning = attestationMeaning(patient.studyId);
  const nothingToAttest = patient.outcome === 'pending' && patient.evaluable;

  async function sign() {
    try {
      await attest.mutateAsync(patient.version);
      sessionStorage.removeItem(resumeKey(patient.id));
      setResuming(false);
    } catch (error) {
      const signingUrl = signingUrlOf(error);
      if (signingUrl) {
        sessionStorage.setItem(resumeKey(patient.id), '1');
        confirmIdentityToSign(signingUrl);
      }
    }
  }

  if (patient.attested) {
    return (
      <p className="text-sm text-ink-800">
        <span aria-hidden>{GLYPHS.done} </span>Attested by {patient.attested.signerName ?? patient.attested.signerEmail} on {dateTime(patient.attested.signedAt)}.
      </p>
    );
  }
  return (
    <div className="grid gap-2 text-sm">
      <p className="text-ink-600">{nothingToAttest ? 'No outcome to attest yet.' : 'Not attested yet.'}</p>
      {canAttest && !nothingToAttest && (
        <>
          {(resuming || ready) && <SigningNotice ready={ready} />}
          <p className="text-xs text-ink-600">
            Signing is an electronic signature, with your password entered at the identity service for it. You sign: “{meaning}”
          </p>
          <div>
            <Button onClick={sign} disabled={attest.isPending} autoFocus={resuming && ready}>
              {attest.isPending ? 'Signing…' : ready ? 'Attest this outcome' : 'Enter your password and attest'}
            </Button>
          </div>
          {attest.error && !signingUrlOf(attest.error) && <ErrorNotice error={attest.error} title="The outcome was not attested" />}
        </>
      )}
    </div>
  );
}
