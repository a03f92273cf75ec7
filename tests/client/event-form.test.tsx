/**
 * The adverse-event form validates as the user types with the schema the server uses: the onset
 * is judged against enrolment, a CTCAE grade 5 (death; NCI CTCAE v5.0) goes with a fatal outcome,
 * and a correction asks for its reason before anything is sent.
 */
import { describe, expect, it, vi } from 'vitest';
import { fireEvent, screen, waitFor } from '@testing-library/react';
import { EventForm } from '../../client/src/features/safety/event-form';
import type { AdverseEvent } from '../../client/src/features/safety/types';
import { renderWithApp } from './render';

const ENROLLED = '2026-03-02';

const enter = (label: string, value: string) => {
  const field = screen.getByLabelText(label);
  fireEvent.change(field, { target: { value } });
  fireEvent.blur(field);
};

describe('the adverse-event form', () => {
  it('when the onset is before enrolment and grade 5 is chosen with a non-fatal outcome, then both fields say so and nothing is sent', async () => {
    const onSubmit = vi.fn(() => Promise.resolve());
    renderWithApp(<EventForm enrolledOn={ENROLLED} submitLabel="Record the event" onSubmit={onSubmit} onCancel={() => undefined} />);
    enter('Onset date', '2026-03-01');
    enter('Event as reported (verbatim term)', 'Sepsis');
    enter('CTCAE grade', '5');
    enter('Outcome', 'recovered');
    fireEvent.click(screen.getByRole('button', { name: 'Record the event' }));
    expect(await screen.findByText(`The onset cannot be before enrolment (${ENROLLED}).`)).toBeInTheDocument();
    expect(screen.getByText('Grade 5 (Death) goes with the outcome "fatal", and a fatal outcome with grade 5.')).toBeInTheDocument();
    expect(onSubmit).not.toHaveBeenCalled();
  });

  it('when a valid event is recorded without a grade yet, then the body carries null for the grade and attribution', async () => {
    const onSubmit = vi.fn((_body: Record<string, unknown>) => Promise.resolve());
    renderWithApp(<EventForm enrolledOn={ENROLLED} submitLabel="Record the event" onSubmit={onSubmit} onCancel={() => undefined} />);
    enter('Onset date', '2026-03-10');
    enter('Event as reported (verbatim term)', 'Fatigue');
    fireEvent.click(screen.getByRole('button', { name: 'Record the event' }));
    await waitFor(() => expect(onSubmit).toHaveBeenCalled());
    expect(onSubmit.mock.calls[0][0]).toEqual({ onsetOn: '2026-03-10', term: 'Fatigue', grade: null, attribution: null, serious: false, outcome: 'unknown', notes: null });
  });

  it('when a recorded event is corrected, then a reason is asked for before anything is sent, and the version goes with it', async () => {
    const event = { id: 'e-1', onsetOn: '2026-03-10', term: 'Rash', grade: 1, attribution: 'possible', serious: false, outcome: 'recovered', notes: null, version: 2 } as AdverseEvent;
    const onSubmit = vi.fn((_body: Record<string, unknown>) => Promise.resolve());
    renderWithApp(<EventForm enrolledOn={ENROLLED} event={event} submitLabel="Save the correction" onSubmit={onSubmit} onCancel={() => undefined} />);
    enter('CTCAE grade', '2');
    fireEvent.click(screen.getByRole('button', { name: 'Save the correction' }));
    expect(await screen.findByText('Give the reason for the correction.')).toBeInTheDocument();
    expect(onSubmit).not.toHaveBeenCalled();
    enter('Reason for the correction', 'Graded again');
    fireEvent.click(screen.getByRole('button', { name: 'Save the correction' }));
    await waitFor(() => expect(onSubmit).toHaveBeenCalled());
    expect(onSubmit.mock.calls[0][0]).toMatchObject({ grade: 2, version: 2, reason: 'Graded again' });
  });
});
