/**
 * The outcome form: the shared schema's messages as the user types, a correction asking for its
 * reason, and the stale-version (409) view with its reload.
 */
import { describe, expect, it } from 'vitest';
import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import { OutcomeForm } from '../../client/src/features/patients/outcome-form';
import { patientRecord, TRIAL_ID } from './patient-fixtures';
import { renderWithApp, sentBody, stubFetch } from './render';

const choose = (label: string, value: string) => {
  const field = screen.getByLabelText(label);
  fireEvent.change(field, { target: { value } });
  fireEvent.blur(field);
};

const fieldMessage = async (label: string) => {
  const field = screen.getByLabelText(label);
  await waitFor(() => expect(field).toHaveAttribute('aria-invalid', 'true'));
  return field;
};

describe('OutcomeForm', () => {
  it('when a responder is recorded without a best overall response, then the field shows the schema message and nothing is sent', async () => {
    const fetchMock = stubFetch();
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={patientRecord()} canWrite />);

    choose('Outcome', 'responder');
    choose('Best overall response', '');
    await fieldMessage('Best overall response');
    expect(screen.getByText(/Best overall response is required once the outcome is known/)).toBeInTheDocument();

    fireEvent.click(screen.getByRole('button', { name: 'Save the outcome' }));
    expect(await screen.findByText(/date of the response assessment is required/)).toBeInTheDocument();
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('when the protocol derives outcomes from assessments, then only evaluability can be entered here and the form says why', () => {
    stubFetch();
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={patientRecord()} canWrite derived />);
    expect(screen.getByLabelText('Outcome')).toBeDisabled();
    expect(screen.getByLabelText('Best overall response')).toBeDisabled();
    expect(screen.getByLabelText('Date of the response assessment')).toBeDisabled();
    expect(screen.getByLabelText('Evaluable')).toBeEnabled();
    expect(screen.getByText(/derives the outcome from the timepoint assessments/)).toBeInTheDocument();
  });

  it('when a non-responder with SD becomes a responder, then SD is cleared because a responder is CR or PR', async () => {
    stubFetch();
    const recorded = patientRecord({ outcome: 'non_responder', bestOverallResponse: 'SD', responseAssessedOn: '2026-05-04', version: 3 });
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={recorded} canWrite />);

    const response = screen.getByLabelText<HTMLSelectElement>('Best overall response');
    expect(response.value).toBe('SD');
    choose('Outcome', 'responder');
    await waitFor(() => expect(response.value).toBe(''));
    const offered = within(response)
      .getAllByRole('option')
      .map((o) => (o as HTMLOptionElement).value)
      .filter(Boolean);
    expect(offered).toEqual(['CR', 'PR']);
  });

  it('when the assessment date is before enrolment, then the field says so as the user types', async () => {
    stubFetch();
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={patientRecord()} canWrite />);

    choose('Outcome', 'responder');
    choose('Date of the response assessment', '2026-01-15');
    const field = await fieldMessage('Date of the response assessment');
    expect(field).toHaveAccessibleDescription(/cannot be before enrolment/);
  });

  it('when a recorded outcome is changed, then it becomes a correction that asks for a reason before saving', async () => {
    const fetchMock = stubFetch();
    const recorded = patientRecord({ outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: '2026-05-04', version: 2 });
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={recorded} canWrite />);
    expect(screen.queryByLabelText('Reason for the correction')).not.toBeInTheDocument();

    choose('Best overall response', 'CR');
    const reason = await screen.findByLabelText('Reason for the correction');
    fireEvent.click(screen.getByRole('button', { name: 'Save the correction' }));
    expect(await screen.findByText(/Changing a recorded outcome is a correction: give the reason/)).toBeInTheDocument();
    expect(reason).toHaveAttribute('aria-invalid', 'true');
    expect(fetchMock).not.toHaveBeenCalled();

    fireEvent.change(reason, { target: { value: 'Source document re-read at monitoring visit' } });
    fireEvent.blur(reason);
    await waitFor(() => expect(reason).toHaveAttribute('aria-invalid', 'false'));
  });

  it('when the server answers 409 with the current record, then the conflict view shows what changed and reload takes the current record', async () => {
    const loaded = patientRecord();
    const current = patientRecord({ outcome: 'non_responder', bestOverallResponse: 'PD', responseAssessedOn: '2026-04-20', version: 2 });
    const fetchMock = stubFetch({
      status: 409,
      body: { error: { code: 'conflict', message: 'This patient was changed by someone else.', current } },
    });
    renderWithApp(<OutcomeForm trialId={TRIAL_ID} patient={loaded} canWrite />);

    choose('Outcome', 'responder');
    choose('Best overall response', 'PR');
    choose('Date of the response assessment', '2026-05-04');
    fireEvent.click(screen.getByRole('button', { name: 'Save the outcome' }));

    const conflict = (await screen.findByText(/Someone saved this patient while you were editing/)).closest('[role="alert"]') as HTMLElement;
    expect(conflict).toHaveTextContent('now version 2');
    expect(fetchMock).toHaveBeenCalledTimes(1);
    expect(fetchMock.mock.calls[0][0]).toBe(`/api/trials/${TRIAL_ID}/patients/${loaded.id}`);
    expect(fetchMock.mock.calls[0][1]?.method).toBe('PATCH');
    expect(sentBody(fetchMock)).toMatchObject({ version: 1, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: '2026-05-04' });

    const outcomeRow = within(conflict).getByRole('row', { name: /^Outcome/ });
    const cells = within(outcomeRow).getAllByRole('cell');
    // Outcomes read as words, not stored codes.
    expect(cells[0]).toHaveTextContent(/^Pending$/);
    expect(cells[1]).toHaveTextContent('Non-responder (changed by someone else)');
    expect(cells[2]).toHaveTextContent(/^Responder$/);
    const evaluableRow = within(conflict).getByRole('row', { name: /^Evaluable/ });
    expect(evaluableRow).not.toHaveTextContent('changed by someone else');

    fireEvent.click(within(conflict).getByRole('button', { name: 'Reload the current record' }));
    await waitFor(() => expect(screen.queryByText(/Someone saved this patient/)).not.toBeInTheDocument());
    expect(screen.getByLabelText<HTMLSelectElement>('Outcome').value).toBe('non_responder');
    expect(screen.getByLabelText<HTMLSelectElement>('Best overall response').value).toBe('PD');
    expect(screen.getByLabelText('Date of the response assessment')).toHaveValue('2026-04-20');
  });
});
