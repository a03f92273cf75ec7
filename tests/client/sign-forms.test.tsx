/**
 * The sign forms: the statement shown before signing is the one the server records (one shared
 * wording), the request names the analysis version the member reviewed, and the form says when
 * the password for this signature has been entered or why the entry was refused. (Sending the
 * browser to the identity provider is a navigation jsdom cannot follow: the browser journey does.)
 */
import { describe, expect, it } from 'vitest';
import { fireEvent, screen, waitFor } from '@testing-library/react';
import { RecommendationForm } from '../../client/src/features/committee-review/recommendation-form';
import { AttestationPanel } from '../../client/src/features/patients/attestation-panel';
import type { DataCut } from '../../client/src/features/data-cuts';
import { recommendationMeaning } from '../../server/words';
import { attestationMeaning } from '../../server/patients/patients.schema';
import { patientRecord, TRIAL_ID } from './patient-fixtures';
import { renderWithApp, sentBody, stubFetch } from './render';

const CUT_ID = '7d0c2f4e-5b1a-4c3e-9a8b-1f2e3d4c5b6a';

const cut = {
  id: CUT_ID,
  trialId: TRIAL_ID,
  seq: 2,
  version: 3,
  snapshot: { trial: { id: TRIAL_ID, code: 'TSY-201', title: 'Invented', indication: 'Invented', sponsorName: null }, cohorts: [{ id: 'c-a', code: 'A', name: 'Cohort A', status: 'interim_review', design: { r1: 3, n1: 13 } }] },
} as unknown as DataCut;

const me = (signingReady: Array<{ action: string; subjectId: string }>) => ({
  status: 200,
  body: {
    user: { id: 'u-1', email: 'mona.monitor@tessaly.test', name: 'Mona Monitor' },
    memberships: [],
    trialManager: false,
    signingReady: signingReady.map((r) => ({ ...r, expiresAt: '2099-01-01T00:00:00.000Z' })),
    environment: { development: true, outbox: false },
  },
});

describe('RecommendationForm', () => {
  it('when a recommendation is chosen, then the statement shown is the one recorded, and signing sends the analysis version reviewed', async () => {
    const fetchMock = stubFetch(me([{ action: 'recommendation', subjectId: CUT_ID }]), { status: 201, body: { recommendations: [], committeeSize: 1, signed: 1 } }, me([]));
    renderWithApp(<RecommendationForm cut={cut} trialId={TRIAL_ID} />);

    expect(screen.getByText(/^I recommend \(your choice\)/)).toBeInTheDocument();
    fireEvent.click(screen.getByLabelText(/Continue to stage 2/));
    expect(await screen.findByText(recommendationMeaning({ decision: 'continue', trialCode: 'TSY-201', cohortCodes: ['A'], cutSeq: 2, cutId: CUT_ID, analysisVersion: 3 }))).toBeInTheDocument();
    expect(recommendationMeaning({ decision: 'continue', trialCode: 'TSY-201', cohortCodes: ['A'], cutSeq: 2, cutId: CUT_ID, analysisVersion: 3 })).toBe(`I recommend "Continue to stage 2" for TSY-201 cohort A on data cut 2 (${CUT_ID}), having reviewed its analysis version 3.`);

    expect(await screen.findByText(/You entered your password for this signature/)).toBeInTheDocument();
    fireEvent.change(screen.getByLabelText('Rationale'), { target: { value: 'Stage 1 passed; continue as planned.' } });
    fireEvent.click(screen.getByRole('button', { name: /Sign the recommendation/ }));
    // The signature used the password entry: who is signed in (and what they may sign) is read again.
    await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(3));
    expect(sentBody(fetchMock, 1)).toEqual({ decision: 'continue', rationale: 'Stage 1 passed; continue as planned.', analysisVersion: 3 });
    expect(fetchMock.mock.calls[2][0]).toBe('/api/me');
  });

  it('when the identity service refused the password entry, then the form says why and nothing was signed', async () => {
    stubFetch(me([]));
    renderWithApp(<RecommendationForm cut={cut} trialId={TRIAL_ID} />, { path: '/review?signInError=no-auth-time' });
    expect(await screen.findByRole('alert')).toHaveTextContent(/did not say when you entered your password/);
    expect(screen.getByRole('button', { name: /Enter your password and sign/ })).toBeInTheDocument();
  });
});

describe('AttestationPanel', () => {
  it('when the investigator may attest, then the statement shown is the one recorded and the button says a password comes first', async () => {
    stubFetch(me([]));
    const patient = patientRecord({ outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: '2026-05-04' });
    renderWithApp(<AttestationPanel trialId={TRIAL_ID} patient={patient} canAttest />);
    expect(screen.getByText(new RegExp(attestationMeaning('RVG-014').replace(/[.*+?^${}()|[\]\\]/g, '\\$&')))).toBeInTheDocument();
    expect(await screen.findByRole('button', { name: /Enter your password and attest/ })).toBeInTheDocument();
  });
});
