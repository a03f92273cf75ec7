/**
 * Safety: the live state of each cohort against its safety rule (statistician and committee), the
 * trial's adverse events at the sites the reader may see (server-side filtering and paging), and
 * the CSV import for site staff.
 */
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { EmptyState, ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { day } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { CTCAE_GRADES } from '../../../../server/safety/safety.schema';
import { useTrialContext } from '../trials';
import { useAdverseEvents } from './get-adverse-events';
import { SafetyOverview } from './safety-state';
import { EventImportPanel } from './import-panel';
import { attributionLabel, GRADE_WORDS, GradeText, outcomeLabel, SeriousTag } from './words';
import type { AdverseEvent, EventFilters } from './types';

const PAGE_SIZE = 50;
const column = createColumnHelper<AdverseEvent>();

function EventsTable({ trialId }: { trialId: string }) {
  const trial = useTrialContext();
  const [filters, setFilters] = useState<EventFilters>({ page: 1, pageSize: PAGE_SIZE });
  const { data, isPending, error } = useAdverseEvents(trialId, filters);
  const set = (change: Partial<EventFilters>) => setFilters((previous) => ({ ...previous, ...change, page: change.page ?? 1 }));
  const columns = [
    column.accessor('onsetOn', { header: 'Onset', cell: (c) => <span className="tabular-nums">{day(c.getValue())}</span> }),
    column.accessor('studyId', {
      header: 'Patient',
      cell: (c) => (
        <Link to={`../patients/${c.row.original.patientId}`} relative="path" className="font-mono underline-offset-2 hover:underline">
          {c.getValue()}
        </Link>
      ),
    }),
    column.accessor('cohortCode', { header: 'Cohort' }),
    column.accessor('term', { header: 'Event' }),
    column.accessor((e) => e.grade ?? 0, { id: 'grade', header: 'CTCAE grade', cell: (c) => <GradeText grade={c.row.original.grade} /> }),
    column.accessor((e) => attributionLabel(e.attribution), { id: 'attribution', header: 'Attribution' }),
    column.accessor('serious', { header: 'Serious', cell: (c) => <SeriousTag serious={c.getValue()} /> }),
    column.accessor((e) => outcomeLabel(e.outcome), { id: 'outcome', header: 'Outcome' }),
    column.accessor((e) => (e.attested ? 'Attested' : 'Not attested'), { id: 'attested', header: 'Attestation' }),
  ];
  return (
    <Panel title="Adverse events">
      <div className="grid gap-3">
        <div className="flex flex-wrap items-end gap-3 text-sm">
          <label className="flex flex-col gap-1">
            <span className="text-xs font-semibold tracking-wide text-ink-700 uppercase">Patient or event</span>
            <input value={filters.q ?? ''} onChange={(e) => set({ q: e.target.value || undefined })} className="rounded-sm border border-ink-300 px-2 py-1.5" />
          </label>
          {trial.cohorts.length > 1 && (
            <label className="flex flex-col gap-1">
              <span className="text-xs font-semibold tracking-wide text-ink-700 uppercase">Cohort</span>
              <select value={filters.cohortId ?? ''} onChange={(e) => set({ cohortId: e.target.value || undefined })} className="rounded-sm border border-ink-300 px-2 py-1.5">
                <option value="">All cohorts</option>
                {trial.cohorts.map((c) => (
                  <option key={c.id} value={c.id}>
                    {c.code}
                  </option>
                ))}
              </select>
            </label>
          )}
          <label className="flex flex-col gap-1">
            <span className="text-xs font-semibold tracking-wide text-ink-700 uppercase">Grade at least</span>
            <select value={filters.minGrade ?? ''} onChange={(e) => set({ minGrade: e.target.value ? Number(e.target.value) : undefined })} className="rounded-sm border border-ink-300 px-2 py-1.5">
              <option value="">Any grade</option>
              {CTCAE_GRADES.map((g) => (
                <option key={g} value={g}>
                  {g} · {GRADE_WORDS[g]}
                </option>
              ))}
            </select>
          </label>
          <label className="flex items-center gap-2">
            <input type="checkbox" checked={filters.serious === true} onChange={(e) => set({ serious: e.target.checked ? true : undefined })} className="h-4 w-4 accent-ink-900" />
            Serious only
          </label>
        </div>
        {error ? (
          <ErrorNotice error={error} title="The adverse events could not be loaded" />
        ) : isPending ? (
          <Loading label="Loading the adverse events" />
        ) : (
          <DataTable
            data={data.events}
            columns={columns}
            label="Adverse events of the trial"
            empty="No adverse event matches."
            server={{ total: data.total, pageIndex: filters.page - 1, pageSize: PAGE_SIZE, onPageChange: (index) => set({ page: index + 1 }) }}
          />
        )}
      </div>
    </Panel>
  );
}

export function SafetyPage() {
  const trial = useTrialContext();
  const seesFigures = hasAnyRole(trial.myRoles, ['statistician', 'monitor']);
  const writes = hasAnyRole(trial.myRoles, ['coordinator', 'investigator']);
  return (
    <div className="grid gap-4">
      <PageHeader title="Safety" subtitle="Adverse events (CTCAE v5.0), the protocol’s toxicity definition and each cohort’s safety rule." />
      {seesFigures ? (
        <SafetyOverview trialId={trial.id} />
      ) : (
        <EmptyState>Toxicity figures are shown to the statistician and the committee; here you record and review your sites’ adverse events.</EmptyState>
      )}
      <EventsTable trialId={trial.id} />
      {writes && <EventImportPanel trialId={trial.id} />}
    </div>
  );
}
