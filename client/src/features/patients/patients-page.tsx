/** The Patients page: counts by outcome, filters, the table, and the enrol form for site roles. */
import { useState, type ReactNode } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { Button, ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { useTrialContext } from '../trials';
import { LIST_STATUSES, OUTCOMES } from '../../../../server/patients/patients.schema';
import { usePatients } from './get-patients';
import { PatientsTable } from './patients-table';
import { EnrolForm } from './enrol-form';
import type { PatientFilters } from './types';
import { OUTCOME_WORDS } from './words';
import { GLYPHS } from '../../../../server/words';

const STATUS_LABELS: Record<(typeof LIST_STATUSES)[number], string> = {
  evaluable: 'Evaluable',
  not_evaluable: 'Not evaluable',
  attested: 'Attested',
  not_attested: 'Not attested',
  flagged: 'Flagged for a check',
};

function readFilters(params: URLSearchParams): PatientFilters {
  const get = (key: string) => params.get(key) ?? undefined;
  return {
    siteId: get('siteId'),
    cohortId: get('cohortId'),
    outcome: get('outcome'),
    status: get('status'),
    stage: get('stage'),
    q: get('q'),
    sort: get('sort') ?? 'studyId',
    dir: get('dir') === 'desc' ? 'desc' : 'asc',
    page: Math.max(1, Number(get('page') ?? 1) || 1),
    pageSize: Number(get('pageSize') ?? 50) || 50,
  };
}

function FilterSelect({ id, label, value, onChange, children }: { id: string; label: string; value?: string; onChange: (v: string) => void; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
        {label}
      </label>
      <select id={id} value={value ?? ''} onChange={(e) => onChange(e.target.value)} className="rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm">
        <option value="">All</option>
        {children}
      </select>
    </div>
  );
}

export function PatientsPage() {
  const trial = useTrialContext();
  const [params, setParams] = useSearchParams();
  const filters = readFilters(params);
  const { data, isPending, error } = usePatients(trial.id, filters);
  const [enrolling, setEnrolling] = useState(false);

  const change = (next: Partial<PatientFilters>) => {
    const merged = { ...filters, page: 1, ...next };
    const out = new URLSearchParams();
    for (const [key, value] of Object.entries(merged)) if (value !== undefined && value !== '') out.set(key, String(value));
    setParams(out, { replace: true });
  };

  const canWrite = (data?.enrolSites.length ?? 0) > 0;
  return (
    <div className="grid gap-4">
      <PageHeader
        title="Patients"
        subtitle={
          trial.myRoles.some((r) => r === 'statistician' || r === 'monitor') ? 'Every site of the trial.' : `Your sites: ${data?.sites.map((s) => s.code).join(', ') ?? '…'}`
        }
        actions={
          <>
            {canWrite && (
              <Button onClick={() => setEnrolling(true)} disabled={enrolling}>
                <span aria-hidden>+</span> Enrol a patient
              </Button>
            )}
            {canWrite && (
              <Link to="import" className="inline-flex items-center gap-2 rounded-sm border border-ink-300 bg-white px-3 py-1.5 text-sm font-semibold text-ink-900 hover:border-ink-500">
                Import a CSV
              </Link>
            )}
            <a
              href={`/api/trials/${trial.id}/patients/export.csv`}
              download
              className="inline-flex items-center gap-2 rounded-sm border border-ink-300 bg-white px-3 py-1.5 text-sm font-semibold text-ink-900 hover:border-ink-500"
            >
              <span aria-hidden>{GLYPHS.download}</span> Export CSV
            </a>
          </>
        }
      />
      {enrolling && data && (
        <Panel title="Enrol a patient">
          <EnrolForm trialId={trial.id} sites={data.enrolSites} cohorts={data.cohorts} onClose={() => setEnrolling(false)} />
        </Panel>
      )}
      {isPending ? (
        <Loading label="Loading patients" />
      ) : error ? (
        <ErrorNotice error={error} title="The patients could not be loaded" />
      ) : (
        <>
          <div role="group" aria-label="Counts by outcome" className="flex flex-wrap gap-2">
            <CountButton label="All" value={data.counts.total} active={!filters.outcome} onClick={() => change({ outcome: undefined })} />
            {OUTCOMES.map((o) => (
              <CountButton
                key={o}
                label={OUTCOME_WORDS[o].label}
                icon={OUTCOME_WORDS[o].glyph}
                value={o === 'pending' ? data.counts.pending : o === 'responder' ? data.counts.responder : data.counts.nonResponder}
                active={filters.outcome === o}
                onClick={() => change({ outcome: o })}
              />
            ))}
            <CountButton label="Not evaluable" value={data.counts.notEvaluable} active={filters.status === 'not_evaluable'} onClick={() => change({ status: 'not_evaluable', outcome: undefined })} />
            <CountButton label="Awaiting attestation" value={data.counts.unattested} active={filters.status === 'not_attested'} onClick={() => change({ status: 'not_attested', outcome: undefined })} />
          </div>
          <Panel>
            <div className="mb-3 flex flex-wrap items-end gap-3">
              <div className="flex flex-col gap-1">
                <label htmlFor="patients-q" className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
                  Study ID
                </label>
                <input id="patients-q" type="search" defaultValue={filters.q} onChange={(e) => change({ q: e.target.value })} className="w-36 rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm" />
              </div>
              {data.sites.length > 1 && (
                <FilterSelect id="patients-site" label="Site" value={filters.siteId} onChange={(v) => change({ siteId: v })}>
                  {data.sites.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.code}
                    </option>
                  ))}
                </FilterSelect>
              )}
              {data.cohorts.length > 1 && (
                <FilterSelect id="patients-cohort" label="Cohort" value={filters.cohortId} onChange={(v) => change({ cohortId: v })}>
                  {data.cohorts.map((c) => (
                    <option key={c.id} value={c.id}>
                      {c.code}
                    </option>
                  ))}
                </FilterSelect>
              )}
              <FilterSelect id="patients-outcome" label="Outcome" value={filters.outcome} onChange={(v) => change({ outcome: v })}>
                {OUTCOMES.map((o) => (
                  <option key={o} value={o}>
                    {OUTCOME_WORDS[o].label}
                  </option>
                ))}
              </FilterSelect>
              <FilterSelect id="patients-status" label="Status" value={filters.status} onChange={(v) => change({ status: v })}>
                {LIST_STATUSES.map((s) => (
                  <option key={s} value={s}>
                    {STATUS_LABELS[s]}
                  </option>
                ))}
              </FilterSelect>
              <FilterSelect id="patients-stage" label="Stage" value={filters.stage} onChange={(v) => change({ stage: v })}>
                <option value="1">Stage 1</option>
                <option value="2">Stage 2</option>
              </FilterSelect>
            </div>
            <PatientsTable patients={data.patients} total={data.total} filters={filters} onChange={change} multiCohort={data.cohorts.length > 1} />
          </Panel>
        </>
      )}
    </div>
  );
}

function CountButton({ label, value, icon, active, onClick }: { label: string; value: number; icon?: string; active: boolean; onClick: () => void }) {
  return (
    <button
      type="button"
      aria-pressed={active}
      onClick={onClick}
      className={`min-w-28 border px-3 py-2 text-left ${active ? 'border-ink-900 bg-ink-50' : 'border-ink-100 bg-white hover:border-ink-300'}`}
    >
      <span className="block text-xs font-medium tracking-wide text-ink-500 uppercase">
        {icon && <span aria-hidden>{icon} </span>}
        {label}
      </span>
      <span className="block text-2xl font-semibold text-ink-950 tabular-nums">{value}</span>
    </button>
  );
}
