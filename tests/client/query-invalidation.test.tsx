/**
 * What each write marks stale in the query cache: exactly what it changed, named through the
 * features' key factories, and the whole trial only when a cohort's status or design moved.
 */
import { describe, expect, it } from 'vitest';
import type { QueryClient, QueryKey } from '@tanstack/react-query';
import { act } from '@testing-library/react';
import { trialKeys } from '../../client/src/features/trials';
import { authKeys } from '../../client/src/features/auth';
import { patientKeys } from '../../client/src/features/patients';
import { assessmentKeys } from '../../client/src/features/assessments';
import { overviewKeys } from '../../client/src/features/trial-overview';
import { accrualKeys } from '../../client/src/features/accrual';
import { portfolioKeys } from '../../client/src/features/portfolio';
import { dataCutKeys } from '../../client/src/features/data-cuts';
import { designKeys } from '../../client/src/features/designs/query-keys';
import { peopleKeys } from '../../client/src/features/people/query-keys';
import { reviewKeys } from '../../client/src/features/committee-review/query-keys';
import { safetyKeys } from '../../client/src/features/safety';
import { useAddEvent } from '../../client/src/features/safety/use-add-event';
import { useAttestEvent } from '../../client/src/features/safety/use-attest-event';
import { useRecordOutcome } from '../../client/src/features/patients/use-record-outcome';
import { useAttestOutcome } from '../../client/src/features/patients/use-attest-outcome';
import { useAddAssessment } from '../../client/src/features/assessments/use-add-assessment';
import { useSignDesign } from '../../client/src/features/designs/use-sign-design';
import { useSignRecommendation } from '../../client/src/features/committee-review/use-sign-recommendation';
import type { PatientFilters } from '../../client/src/features/patients/types';
import { patientRecord, TRIAL_ID } from './patient-fixtures';
import { renderHookWithApp, stubFetch } from './render';

const OTHER_TRIAL = 't-0002';
const PATIENT = 'p-0001';
const OTHER_PATIENT = 'p-0002';
const CUT = 'd-0001';
const filters: PatientFilters = { sort: 'studyId', dir: 'asc', page: 1, pageSize: 50 };
const settings = { p0: 0.2, p1: 0.4, alpha: 0.05, beta: 0.2, nmax: 60 };

/** One cached answer per page a user may have open, under a name the assertions read. */
const CACHED: Record<string, QueryKey> = {
  'trial record': trialKeys.detail(TRIAL_ID),
  patient: patientKeys.detail(TRIAL_ID, PATIENT),
  'patient history': patientKeys.history(TRIAL_ID, PATIENT),
  'other patient': patientKeys.detail(TRIAL_ID, OTHER_PATIENT),
  'patient list': patientKeys.list(TRIAL_ID, filters),
  'patient assessments': assessmentKeys.patient(TRIAL_ID, PATIENT),
  'other patient assessments': assessmentKeys.patient(TRIAL_ID, OTHER_PATIENT),
  'needs attention': assessmentKeys.needsAttention(TRIAL_ID),
  evaluation: overviewKeys.evaluation(TRIAL_ID),
  accrual: accrualKeys.all(TRIAL_ID),
  portfolio: portfolioKeys.rows({}),
  designs: designKeys.all(TRIAL_ID),
  'design candidates': designKeys.candidates(TRIAL_ID, settings),
  memberships: peopleKeys.memberships(TRIAL_ID),
  'data cut list': dataCutKeys.list(TRIAL_ID),
  'data cut': dataCutKeys.detail(CUT),
  'data cut analysis': dataCutKeys.analysis(CUT, {}),
  recommendations: reviewKeys.recommendations(CUT),
  'patient adverse events': safetyKeys.patientEvents(TRIAL_ID, PATIENT),
  'adverse event list': safetyKeys.list(TRIAL_ID, { page: 1, pageSize: 50 }),
  'safety state': safetyKeys.state(TRIAL_ID),
  'other trial record': trialKeys.detail(OTHER_TRIAL),
  'other trial patient list': patientKeys.list(OTHER_TRIAL, filters),
  'signed-in user': authKeys.me(),
};

const EVERYTHING_OF_THE_TRIAL = Object.keys(CACHED).filter(
  (name) => !['data cut', 'data cut analysis', 'recommendations', 'design candidates', 'other trial record', 'other trial patient list', 'signed-in user'].includes(name),
);

function fillCache(queryClient: QueryClient) {
  for (const key of Object.values(CACHED)) queryClient.setQueryData(key, { cached: true });
}

const staleNames = (queryClient: QueryClient) =>
  Object.entries(CACHED)
    .filter(([, key]) => queryClient.getQueryState(key)?.isInvalidated)
    .map(([name]) => name)
    .sort();

const outcomeAnswer = (paused: boolean) => ({
  status: 200,
  body: { patient: patientRecord({ id: PATIENT, outcome: 'responder', version: 2 }), changed: true, correction: false, attestationCleared: false, accrual: { paused, continuesAtRisk: false } },
});

const outcomeInput = { version: 1, outcome: 'responder' as const, bestOverallResponse: 'PR' as const, responseAssessedOn: '2026-04-01', evaluable: true, notEvaluableReason: null, reason: null };

describe('what a write marks stale', () => {
  it('when an outcome is recorded, then the patient, the lists, its assessments, Needs attention and the counted figures are stale, and nothing else', async () => {
    stubFetch(outcomeAnswer(false));
    const { result, queryClient } = renderHookWithApp(() => useRecordOutcome(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync(outcomeInput));

    expect(staleNames(queryClient)).toEqual(
      ['patient', 'patient history', 'patient list', 'patient assessments', 'needs attention', 'evaluation', 'accrual', 'portfolio', 'safety state'].sort(),
    );
  });

  it('when recording an outcome completes stage 1, then everything about the trial and the Portfolio is stale, but not another trial', async () => {
    stubFetch(outcomeAnswer(true));
    const { result, queryClient } = renderHookWithApp(() => useRecordOutcome(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync(outcomeInput));

    expect(staleNames(queryClient)).toEqual([...EVERYTHING_OF_THE_TRIAL].sort());
  });

  it('when an outcome is attested, then only the patient, the lists and the session’s signing readiness are stale: no figure counts attestations', async () => {
    stubFetch({ status: 200, body: { patient: patientRecord({ id: PATIENT, version: 2 }) } });
    const { result, queryClient } = renderHookWithApp(() => useAttestOutcome(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync(1));

    expect(staleNames(queryClient)).toEqual(['patient', 'patient history', 'patient list', 'signed-in user'].sort());
  });

  it.each([
    ['entered', ['patient', 'patient history', 'patient list', 'needs attention']],
    ['derived', ['patient', 'patient history', 'patient list', 'needs attention', 'evaluation', 'accrual', 'portfolio', 'safety state']],
  ])('when an assessment is added and the protocol’s outcomes are %s, then the panel takes the answer and only what the derivation can change is stale', async (outcomeSource, expected) => {
    const view = { outcomeSource, assessments: [], assessment: { id: 'a-0001' } };
    stubFetch({ status: 201, body: view });
    const { result, queryClient } = renderHookWithApp(() => useAddAssessment(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({ date: '2026-04-01', response: 'PR' }));

    expect(staleNames(queryClient)).toEqual([...expected].sort());
    expect(queryClient.getQueryData(assessmentKeys.patient(TRIAL_ID, PATIENT))).toEqual(view);
  });

  it('when a design is signed, then everything about the trial, the Portfolio and the session’s signing readiness is stale, and the slow candidate search is kept', async () => {
    stubFetch({ status: 201, body: { design: { id: 'v-0001' } } });
    const { result, queryClient } = renderHookWithApp(() => useSignDesign(TRIAL_ID, 'c-a', 'lock'));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({}));

    expect(staleNames(queryClient)).toEqual([...EVERYTHING_OF_THE_TRIAL, 'signed-in user'].sort());
    expect(staleNames(queryClient)).not.toContain('design candidates');
  });

  it('when a committee member signs a recommendation, then the cut, its recommendations, the list of cuts, the Portfolio and the session’s signing readiness are stale, and the analysis is kept', async () => {
    stubFetch({ status: 201, body: { recommendations: [], committeeSize: 3, signed: 1 } });
    const { result, queryClient } = renderHookWithApp(() => useSignRecommendation(CUT, TRIAL_ID));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({ decision: 'continue', rationale: 'Stage 1 passed as planned.', analysisVersion: 1 }));

    expect(staleNames(queryClient)).toEqual(['data cut', 'recommendations', 'data cut list', 'portfolio', 'signed-in user'].sort());
  });

  it('when an adverse event is recorded, then the patient’s events, the event list and the live safety state are stale, and nothing else', async () => {
    stubFetch({ status: 201, body: { events: [], safety: { paused: false, state: null } } });
    const { result, queryClient } = renderHookWithApp(() => useAddEvent(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({ onsetOn: '2026-04-01', term: 'Rash', grade: 1, attribution: 'possible', serious: false, outcome: 'recovered' }));

    expect(staleNames(queryClient)).toEqual(['patient adverse events', 'adverse event list', 'safety state'].sort());
  });

  it('when an adverse event crosses the safety rule and pauses accrual, then everything about the trial and the Portfolio is stale, but not another trial', async () => {
    stubFetch({ status: 201, body: { events: [], safety: { paused: true, state: null } } });
    const { result, queryClient } = renderHookWithApp(() => useAddEvent(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({}));

    expect(staleNames(queryClient)).toEqual([...EVERYTHING_OF_THE_TRIAL].sort());
  });

  it('when an adverse event is attested, then only the events are stale: no figure counts attestations', async () => {
    stubFetch({ status: 201, body: { event: { id: 'e-0001' } } });
    const { result, queryClient } = renderHookWithApp(() => useAttestEvent(TRIAL_ID, PATIENT));
    fillCache(queryClient);
    await act(() => result.current.mutateAsync({ eventId: 'e-0001', version: 1 }));

    expect(staleNames(queryClient)).toEqual(['patient adverse events', 'adverse event list'].sort());
  });
});
