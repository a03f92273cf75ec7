/**
 * The site investigator's attestation: an electronic signature over the recorded outcome. When the
 * server asks for a fresh sign-in, the intent is kept in this tab, the investigator signs in again
 * at the identity provider and comes back here to sign.
 */
import { useState } from 'react';
import { Button, ErrorNotice } from '../../components/ui';
import { ApiError, reauthenticate } from '../../lib/api';
import { dateTime } from '../../lib/format';
import { useAttestOutcome } from './use-attest-outcome';
import type { Patient } from './types';
import { GLYPHS } from '../../../../server/words';

const resumeKey = (patientId: string) => `orrery.attest-resume.${patientId}`;

export function AttestationPanel({ trialId, patient, canAttest }: { trialId: string; patient: Patient; canAttest: boolean }) {
  const attest = useAttestOutcome(trialId, patient.id);
  const [resuming, setResuming] = useState(() => sessionStorage.getItem(resumeKey(patient.id)) !== null);
  const meaning = `I attest that the outcome recorded for ${patient.studyId} is accurate and complete.`;
  const nothingToAttest = patient.outcome === 'pending' && patient.evaluable;

  async function sign() {
    try {
      await attest.mutateAsync(patient.version);
      sessionStorage.removeItem(resumeKey(patient.id));
      setResuming(false);
    } catch (error) {
      if (error instanceof ApiError && error.code === 'reauthentication_required') {
        sessionStorage.setItem(resumeKey(patient.id), '1');
        reauthenticate();
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
          {resuming && (
            <p role="status" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-ink-800">
              <span aria-hidden>{GLYPHS.restored} </span>You signed in again. Check the outcome above and sign.
            </p>
          )}
          <p className="text-xs text-ink-600">Signing is an electronic signature: “{meaning}” You will be asked to confirm your identity if your sign-in is not recent.</p>
          <div>
            <Button onClick={sign} disabled={attest.isPending} autoFocus={resuming}>
              {attest.isPending ? 'Signing…' : 'Attest this outcome'}
            </Button>
          </div>
          {attest.error && !(attest.error instanceof ApiError && attest.error.code === 'reauthentication_required') && (
            <ErrorNotice error={attest.error} title="The outcome was not attested" />
          )}
        </>
      )}
    </div>
  );
}
