/**
 * A patient's adverse events on the patient page: the toxicity status under the locked definition,
 * explained in sentences; the events in a table; recording, correcting (with a reason) and removing
 * them for site staff at the patient's site; and the site investigator's attestation of each event
 * (an electronic signature; a sign-in that is too old sends the investigator to sign in again and
 * back here).
 */
import { useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, ErrorNotice, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { confirmIdentityToSign, signingUrlOf } from '../../lib/api';
import { SigningNotice } from '../../components/signing-notice';
import { GLYPHS } from '../../../../server/words';
import { useSigningReady } from '../auth';
import { dateTime, day } from '../../lib/format';
import { usePatientEvents } from './get-patient-events';
import { useAddEvent } from './use-add-event';
import { useCorrectEvent } from './use-correct-event';
import { useRemoveEvent } from './use-remove-event';
import { useAttestEvent } from './use-attest-event';
import { EventForm } from './event-form';
import { attributionLabel, GradeText, outcomeLabel, SeriousTag, ToxicityStatusTag } from './words';
import type { AdverseEvent, PatientEventsView } from './types';

const resumeKey = (patientId: string) => `orrery.attest-event-resume.${patientId}`;

type Editing = { kind: 'new' } | { kind: 'correct'; event: AdverseEvent } | { kind: 'remove'; event: AdverseEvent } | null;

function ToxicityBlock({ view }: { view: PatientEventsView }) {
  if (!view.toxicity) {
    return <p className="text-sm text-ink-600">The cohort’s locked design monitors response only: events are recorded, and no toxicity definition applies.</p>;
  }
  return (
    <section aria-label="Toxicity under the protocol's definition" className="grid gap-1 text-sm">
      <p>
        <span className="text-xs font-semibold tracking-wide text-ink-500 uppercase">Toxicity status: </span>
        <ToxicityStatusTag status={view.toxicity.status} />
      </p>
      <ul className="list-disc pl-5 text-ink-700">
        {view.toxicity.explanation.map((line) => (
          <li key={line}>{line}</li>
        ))}
      </ul>
    </section>
  );
}

function RemoveForm({ event, onRemove, onCancel }: { event: AdverseEvent; onRemove: (reason: string) => Promise<unknown>; onCancel: () => void }) {
  const [reason, setReason] = useState('');
  const [error, setError] = useState<unknown>(null);
  return (
    <form
      aria-label={`Remove the adverse event ${event.term}`}
      className="grid gap-2 border border-alert-600/40 bg-alert-50 p-3 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        setError(null);
        onRemove(reason).catch(setError);
      }}
    >
      <label htmlFor="remove-reason" className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
        Reason for removing “{event.term}” ({day(event.onsetOn)})
      </label>
      <textarea id="remove-reason" value={reason} onChange={(e) => setReason(e.target.value)} rows={2} className="rounded-sm border border-ink-300 bg-white px-2 py-1.5" />
      <div className="flex gap-2">
        <Button type="submit" variant="danger" disabled={!reason.trim()}>
          Remove the event
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
      {error !== null && <ErrorNotice error={error} title="The event was not removed" />}
    </form>
  );
}

const column = createColumnHelper<AdverseEvent>();

export function AdverseEventsPanel({ trialId, patientId, canWrite, canAttest }: { trialId: string; patientId: string; canWrite: boolean; canAttest: boolean }) {
  const { data: view, isPending, error } = usePatientEvents(trialId, patientId);
  const add = useAddEvent(trialId, patientId);
  const correct = useCorrectEvent(trialId, patientId);
  const remove = useRemoveEvent(trialId, patientId);
  const attest = useAttestEvent(trialId, patientId);
  const [editing, setEditing] = useState<Editing>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [resuming] = useState(() => sessionStorage.getItem(resumeKey(patientId)));
  // The password entered at the identity provider for the event being attested, if it is waiting.
  const ready = useSigningReady('attestation', resuming ?? '');

  // The visible words start the button's name, so speech and sight agree.
  const attestLabel = (e: AdverseEvent) => (resuming === e.id && ready ? 'Attest' : 'Enter your password and attest');

  async function sign(event: AdverseEvent) {
    try {
      await attest.mutateAsync({ eventId: event.id, version: event.version });
      sessionStorage.removeItem(resumeKey(patientId));
      setNotice(`The event “${event.term}” is attested.`);
    } catch (failure) {
      const signingUrl = signingUrlOf(failure);
      if (signingUrl) {
        sessionStorage.setItem(resumeKey(patientId), event.id);
        confirmIdentityToSign(signingUrl);
      }
    }
  }

  const columns = [
    column.accessor('onsetOn', { header: 'Onset', cell: (c) => <span className="tabular-nums">{day(c.getValue())}</span> }),
    column.accessor('term', { header: 'Event', cell: (c) => <span className="font-medium">{c.getValue()}</span> }),
    column.accessor((e) => e.grade ?? 0, { id: 'grade', header: 'CTCAE grade', cell: (c) => <GradeText grade={c.row.original.grade} /> }),
    column.accessor((e) => attributionLabel(e.attribution), { id: 'attribution', header: 'Attribution' }),
    column.accessor('serious', { header: 'Serious', cell: (c) => <SeriousTag serious={c.getValue()} /> }),
    column.accessor((e) => outcomeLabel(e.outcome), { id: 'outcome', header: 'Outcome' }),
    column.accessor((e) => (e.attested ? 'Attested' : 'Not attested'), {
      id: 'attested',
      header: 'Attestation',
      cell: (c) => {
        const e = c.row.original;
        if (e.attested) {
          return (
            <span className="text-xs">
              <span aria-hidden>{GLYPHS.done} </span>
              {e.attested.signerName ?? e.attested.signerEmail}, {dateTime(e.attested.signedAt)}
            </span>
          );
        }
        if (!canAttest) return <span className="text-xs text-ink-500">Not attested</span>;
        return (
          <Button variant="secondary" onClick={() => void sign(e)} disabled={attest.isPending} autoFocus={resuming === e.id} aria-label={`${attestLabel(e)}: ${e.term}, ${day(e.onsetOn)}`}>
            {attestLabel(e)}
          </Button>
        );
      },
    }),
    ...(canWrite
      ? [
          column.display({
            id: 'actions',
            header: '',
            cell: (c) => (
              <span className="flex gap-1">
                <Button variant="quiet" onClick={() => setEditing({ kind: 'correct', event: c.row.original })} aria-label={`Correct the event ${c.row.original.term}`}>
                  Correct
                </Button>
                <Button variant="quiet" onClick={() => setEditing({ kind: 'remove', event: c.row.original })} aria-label={`Remove the event ${c.row.original.term}`}>
                  Remove
                </Button>
              </span>
            ),
          }),
        ]
      : []),
  ];

  return (
    <Panel
      title="Adverse events"
      actions={
        canWrite && editing?.kind !== 'new' ? (
          <Button variant="secondary" onClick={() => setEditing({ kind: 'new' })}>
            Record an adverse event
          </Button>
        ) : undefined
      }
    >
      {isPending ? (
        <Loading label="Loading the adverse events" />
      ) : error ? (
        <ErrorNotice error={error} title="The adverse events could not be loaded" />
      ) : (
        <div className="grid gap-3">
          <ToxicityBlock view={view} />
          {resuming && canAttest && <SigningNotice ready={ready} />}
          {editing?.kind === 'new' && (
            <EventForm
              enrolledOn={view.patient.enrolledOn}
              submitLabel="Record the event"
              onCancel={() => setEditing(null)}
              onSubmit={async (body) => {
                const written = await add.mutateAsync(body);
                setEditing(null);
                setNotice(written.safety.paused ? 'Event recorded. It crossed the cohort’s safety rule: accrual is now paused for a safety review, and the statistician and the committee are told.' : 'Event recorded.');
              }}
            />
          )}
          {editing?.kind === 'correct' && (
            <EventForm
              key={editing.event.id}
              enrolledOn={view.patient.enrolledOn}
              event={editing.event}
              submitLabel="Save the correction"
              onCancel={() => setEditing(null)}
              onSubmit={async (body) => {
                const written = await correct.mutateAsync({ eventId: editing.event.id, body });
                setEditing(null);
                setNotice(
                  `Correction saved.${written.attestationCleared ? ' The attestation was cleared: the site investigator needs to attest the event again.' : ''}${written.safety.paused ? ' It crossed the cohort’s safety rule: accrual is now paused for a safety review.' : ''}`,
                );
              }}
            />
          )}
          {editing?.kind === 'remove' && (
            <RemoveForm
              event={editing.event}
              onCancel={() => setEditing(null)}
              onRemove={async (reason) => {
                await remove.mutateAsync({ eventId: editing.event.id, version: editing.event.version, reason });
                setEditing(null);
                setNotice('Event removed.');
              }}
            />
          )}
          {notice && (
            <p role="status" className="text-sm text-ink-700">
              <span aria-hidden>✓ </span>
              {notice}
            </p>
          )}
          {attest.error && !signingUrlOf(attest.error) && (
            <ErrorNotice error={attest.error} title="The event was not attested" />
          )}
          <DataTable data={view.events} columns={columns} label={`Adverse events of ${view.patient.studyId}`} empty="No adverse event recorded." initialSorting={[{ id: 'onsetOn', desc: false }]} />
        </div>
      )}
    </Panel>
  );
}
