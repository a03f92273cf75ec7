/** The enrol form: the shared schema's date rule as the user types and the server's field errors under their inputs. */
import { describe, expect, it, vi } from 'vitest';
import { fireEvent, screen, waitFor } from '@testing-library/react';
import { EnrolForm } from '../../client/src/features/patients/enrol-form';
import { TRIAL_ID } from './patient-fixtures';
import { renderWithApp, sentBody, stubFetch } from './render';

const sites = [{ id: 's-rvg', code: 'RVG', name: 'Riverside General' }];
const cohorts = [{ id: 'c-a', code: 'A', name: 'All comers', status: 'enrolling_stage_1' as const, position: 1 }];

const renderForm = () => renderWithApp(<EnrolForm trialId={TRIAL_ID} sites={sites} cohorts={cohorts} onClose={vi.fn()} />);

describe('EnrolForm', () => {
  it('when the enrolment date is in the future, then the field shows the schema message and nothing is sent', async () => {
    const fetchMock = stubFetch();
    renderForm();
    const date = screen.getByLabelText('Enrolment date');
    fireEvent.change(date, { target: { value: '2999-01-01' } });
    fireEvent.blur(date);

    await waitFor(() => expect(date).toHaveAccessibleDescription('Enrolment date cannot be in the future.'));
    expect(date).toHaveAttribute('aria-invalid', 'true');
    fireEvent.click(screen.getByRole('button', { name: /Enrol/ }));
    await waitFor(() => expect(screen.getByRole('button', { name: /Enrol/ })).toBeEnabled());
    expect(fetchMock).not.toHaveBeenCalled();
  });

  it('when the server answers 400 with a study ID reason, then the reason appears under the Study ID input', async () => {
    const fetchMock = stubFetch({
      status: 400,
      body: { error: { code: 'invalid_input', message: 'The patient was not enrolled.', fields: { studyId: 'RVG-014 is already enrolled in this trial.' } } },
    });
    renderForm();
    const studyId = screen.getByLabelText('Study ID');
    expect(studyId).toHaveValue('RVG-');
    fireEvent.change(studyId, { target: { value: 'RVG-014' } });
    fireEvent.change(screen.getByLabelText('Enrolment date'), { target: { value: '2026-03-02' } });
    fireEvent.click(screen.getByRole('button', { name: /Enrol/ }));

    await waitFor(() => expect(studyId).toHaveAccessibleDescription('RVG-014 is already enrolled in this trial.'));
    expect(studyId).toHaveAttribute('aria-invalid', 'true');
    expect(screen.getByLabelText('Enrolment date')).toHaveAttribute('aria-invalid', 'false');
    // With field reasons, the form does not repeat them in a general notice.
    expect(screen.queryByText('The patient was not enrolled')).not.toBeInTheDocument();
    expect(fetchMock.mock.calls[0][0]).toBe(`/api/trials/${TRIAL_ID}/patients`);
    expect(sentBody(fetchMock)).toEqual({ studyId: 'RVG-014', siteId: 's-rvg', cohortId: 'c-a', enrolledOn: '2026-03-02' });
  });
});
