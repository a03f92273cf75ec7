/**
 * A patient's timepoint assessments and the best overall response derived from them: the list,
 * the explanation in plain sentences, what is still needed, the flag when an entered outcome
 * disagrees, and (for the site's coordinator or investigator) entry and corrections.
 */
import { useMemo, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, Cautions, ErrorNotice, Figure, Glyphed, Loading, Panel } from '../../components/ui';
import { DECISION_SUPPORT_ONLY, GLYPHS, INTERIM_DATA, OUTCOME_WORDS } from '../../../../server/words';
import { DataTable } from '../../components/data-table';
import { day } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { useTrial } from '../trials';
import { useAssessments } from './get-assessments';
import { AddAssessmentForm, CorrectAssessmentForm, RemoveAssessmentForm } from './assessment-forms';
import { ATTENTION_WORDS, STEP_WORDS, Tag, responderWords } from './words';
import type { Assessment, AssessmentsView, DerivationStep } from './types';

const DERIVATION_CAUTION =
  'The derived best overall response applies RECIST 1.1 as this trial’s protocol settings describe it; the investigator’s assessment and any independent review prevail, and the statistician confirms the analysis population.';

type Row = Assessment & { step?: DerivationStep };
type Editing = { id: string; mode: 'correct' | 'remove' } | null;


function DerivationSummary({ view }: { view: AssessmentsView }) {
  const { derivation, patient, outcomeSource } = view;
  const responder = responderWords(derivation.responder);
  const confirmation = !view.settings.confirmationRequired ? 'Not required' : derivation.confirmed ? 'Confirmed' : 'Not confirmed';
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap gap-6">
        <Figure label="Derived best overall response" value={derivation.bestOverallResponse ?? '—'} hint={derivation.basisDate ? `from ${day(derivation.basisDate)}` : 'no assessment yet'} />
        <Figure label="Derived outcome" value={<Tag {...responder} />} />
        <Figure label="Confirmation" value={<span className="text-base">{confirmation}</span>} />
        <Figure
          label={outcomeSource === 'derived' ? 'Outcome (derived)' : 'Outcome (entered)'}
          value={<span className="text-base"><Glyphed word={OUTCOME_WORDS[patient.outcome]} /></span>}
          hint={patient.bestOverallResponse ?? undefined}
        />
      </div>
      {patient.outcomeFlag && (
        <div role="alert" className="border-l-4 border-brass-500 bg-brass-50 px-4 py-3 text-sm text-ink-900">
          <p className="font-semibold">
            <span aria-hidden>{GLYPHS.disagrees} </span>The entered outcome disagrees with the derivation
          </p>
          <p>
            {derivation.attention.find((a) => a.kind === 'entered-disagrees')?.message ??
              'The outcome entered for this patient differs from the one derived from the assessments.'}{' '}
            The entered outcome is kept as it is: check the assessments or correct the outcome, with a reason.
          </p>
        </div>
      )}
      <section aria-labelledby="derivation-why">
        <h3 id="derivation-why" className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">
          Why
        </h3>
        <ol className="list-decimal space-y-1 pl-5 text-sm leading-relaxed">
          {derivation.explanation.map((sentence) => (
            <li key={sentence}>{sentence}</li>
          ))}
        </ol>
      </section>
      {derivation.needed.length > 0 && (
        <section aria-labelledby="derivation-needed">
          <h3 id="derivation-needed" className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">
            Still needed
          </h3>
          <ul className="space-y-1 text-sm">
            {derivation.needed.map((sentence) => (
              <li key={sentence}>
                <span aria-hidden>{GLYPHS.pending} </span>
                {sentence}
              </li>
            ))}
          </ul>
        </section>
      )}
      {derivation.attention.filter((a) => a.kind !== 'entered-disagrees').length > 0 && (
        <section aria-labelledby="derivation-attention">
          <h3 id="derivation-attention" className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">
            Needs attention
          </h3>
          <ul className="space-y-1 text-sm">
            {derivation.attention
              .filter((a) => a.kind !== 'entered-disagrees')
              .map((item) => (
                <li key={`${item.kind}-${item.date ?? ''}`} className="flex flex-wrap items-baseline gap-2">
                  <Tag {...ATTENTION_WORDS[item.kind]} />
                  {item.message}
                </li>
              ))}
          </ul>
        </section>
      )}
    </div>
  );
}

const column = createColumnHelper<Row>();

export function AssessmentsPanel({ trialId, patientId }: { trialId: string; patientId: string }) {
  const { data: view, isPending, error } = useAssessments(trialId, patientId);
  const { data: trial } = useTrial(trialId);
  const [editing, setEditing] = useState<Editing>(null);

  const canWrite = !!view && !!trial && hasAnyRole(trial.myRoles, ['coordinator', 'investigator']) && trial.mySiteIds.includes(view.patient.siteId);
  const rows = useMemo<Row[]>(
    () => (view ? view.assessments.map((a) => ({ ...a, step: view.derivation.steps.find((s) => s.assessmentId === a.id) })) : []),
    [view],
  );
  const columns = useMemo(
    () => [
      column.accessor('date', { header: 'Date', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
      column.accessor('response', { header: 'Response', cell: (c) => <span className="font-mono font-semibold">{c.getValue()}</span> }),
      column.accessor((r) => (r.step ? STEP_WORDS[r.step.role].label : ''), {
        id: 'role',
        header: 'In the derivation',
        cell: (c) => {
          const step = c.row.original.step;
          return step ? (
            <div className="grid justify-items-start gap-1">
              <Tag {...STEP_WORDS[step.role]} />
              <span className="text-xs text-ink-500">{step.note}</span>
            </div>
          ) : null;
        },
      }),
      column.accessor((r) => r.notes ?? '', { id: 'notes', header: 'Notes', cell: (c) => <span className="text-ink-700">{c.getValue() || '—'}</span> }),
      ...(canWrite
        ? [
            column.display({
              id: 'actions',
              header: 'Actions',
              cell: (c) => (
                <div className="flex gap-1">
                  <Button variant="quiet" onClick={() => setEditing({ id: c.row.original.id, mode: 'correct' })} aria-label={`Correct the assessment of ${c.row.original.date}`}>
                    Correct
                  </Button>
                  <Button variant="quiet" onClick={() => setEditing({ id: c.row.original.id, mode: 'remove' })} aria-label={`Remove the assessment of ${c.row.original.date}`}>
                    Remove
                  </Button>
                </div>
              ),
            }),
          ]
        : []),
    ],
    [canWrite],
  );

  if (isPending) return <Loading label="Loading the assessments" />;
  if (error) return <ErrorNotice error={error} title="The assessments could not be loaded" />;
  const selected = editing && view.assessments.find((a) => a.id === editing.id);

  return (
    <Panel
      title="Tumour assessments"
      actions={
        <span className="text-xs text-ink-500">
          {view.outcomeSource === 'derived' ? 'Outcome derived from assessments' : 'Outcome entered directly; assessments are checked against it'}
        </span>
      }
    >
      <div className="grid gap-5">
        <DerivationSummary view={view} />
        <DataTable
          data={rows}
          columns={columns}
          label="Timepoint assessments"
          initialSorting={[{ id: 'date', desc: false }]}
          empty="No assessment recorded yet."
          pageSize={25}
        />
        {selected && editing?.mode === 'correct' && (
          <CorrectAssessmentForm trialId={trialId} patientId={patientId} enrolledOn={view.patient.enrolledOn} assessment={selected} onDone={() => setEditing(null)} />
        )}
        {selected && editing?.mode === 'remove' && <RemoveAssessmentForm trialId={trialId} patientId={patientId} assessment={selected} onDone={() => setEditing(null)} />}
        {canWrite && <AddAssessmentForm trialId={trialId} patientId={patientId} enrolledOn={view.patient.enrolledOn} />}
        <Cautions items={[DERIVATION_CAUTION, DECISION_SUPPORT_ONLY, INTERIM_DATA]} />
      </div>
    </Panel>
  );
}
