/**
 * The import panels share their controls and summary: "Import" waits for a clean check, a check
 * with bad rows says so with each row's reason, and a refused commit (422) shows the rows that
 * stopped it instead of a generic error; a date that is not a real calendar day is shown as written
 * (it used to crash the panel).
 */
import { describe, expect, it } from 'vitest';
import { fireEvent, screen, waitFor } from '@testing-library/react';
import { ImportPanel } from '../../client/src/features/assessments/import-panel';
import { EventImportPanel } from '../../client/src/features/safety/import-panel';
import { renderWithApp, stubFetch } from './render';

const TRIAL_ID = '5b0d6a52-1c1e-4e0f-9f53-2f7f0c4a9e11';
const counts = (rows: Partial<Record<'new' | 'update' | 'unchanged' | 'error', number>>) => {
  const all = { new: 0, update: 0, unchanged: 0, error: 0, ...rows };
  return { ...all, total: all.new + all.update + all.unchanged + all.error };
};

function chooseFile(label = 'CSV file') {
  const file = new File(['study_id\n'], 'rows.csv', { type: 'text/csv' });
  fireEvent.change(screen.getByLabelText(label), { target: { files: [file] } });
}

describe('the shared CSV import controls', () => {
  it('when a checked file is clean, then Import opens and a commit says what it did', async () => {
    const row = { line: 2, studyId: 'TSY-201-001', date: '2026-03-02', result: 'new', errors: [] };
    stubFetch(
      { status: 200, body: { dryRun: true, committed: false, counts: counts({ new: 1 }), rows: [row], derivationsChanged: 0 } },
      { status: 200, body: { dryRun: false, committed: true, counts: counts({ new: 1 }), rows: [row], derivationsChanged: 1 } },
    );
    renderWithApp(<ImportPanel trialId={TRIAL_ID} />);
    const importButton = screen.getByRole('button', { name: 'Import' });
    expect(importButton).toBeDisabled();
    chooseFile();
    expect(importButton).toBeDisabled();
    fireEvent.click(screen.getByRole('button', { name: 'Check the file' }));
    expect(await screen.findByText('The file is ready to import.')).toBeInTheDocument();
    await waitFor(() => expect(importButton).toBeEnabled());
    fireEvent.click(importButton);
    expect(await screen.findByText('Imported. 1 patient had the derived best overall response change.')).toBeInTheDocument();
  });

  it('when a commit is refused for bad rows, then the rows and their reasons are shown and Import stays closed', async () => {
    const rows = [{ line: 3, studyId: 'TSY-201-002', onsetOn: '2026-13-01', term: 'Nausea', result: 'error', errors: [{ column: 'onset_on', reason: 'Not a date.' }] }];
    stubFetch({ status: 422, body: { error: { code: 'import_rejected', message: '1 of 1 rows have errors, so nothing was imported.', counts: counts({ error: 1 }), rows } } });
    renderWithApp(<EventImportPanel trialId={TRIAL_ID} />);
    chooseFile();
    fireEvent.click(screen.getByRole('button', { name: 'Check the file' }));
    expect(await screen.findByText('Nothing was imported: some rows have errors.')).toBeInTheDocument();
    expect(screen.getByText(/Not a date\./)).toBeInTheDocument();
    expect(screen.getByText('2026-13-01')).toBeInTheDocument();
    expect(screen.queryByText('The file was not imported')).toBeNull();
    expect(screen.getByRole('button', { name: 'Import' })).toBeDisabled();
  });
});
