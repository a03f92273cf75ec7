/**
 * Data cuts of a trial: the list with each cut's counts and how many committee members have signed,
 * and for the statistician the form that freezes a new cut (with progress while it is copied).
 */
import { Form, Formik } from 'formik';
import { Link, useNavigate } from 'react-router-dom';
import type { ColumnDef } from '@tanstack/react-table';
import { Button, Cautions, ErrorNotice, Loading, PageHeader, Panel, Spinner } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { SelectField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { dateTime } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { createDataCutSchema, type CutKind } from '../../../../server/data-cuts/data-cuts.schema';
import { useTrialContext } from '../trials';
import { useDataCuts } from './get-data-cuts';
import { useFreezeDataCut } from './use-freeze-data-cut';
import type { DataCutListItem } from './types';
import { GLYPHS } from '../../../../server/words';

function FreezeForm({ trialId }: { trialId: string }) {
  const trial = useTrialContext();
  const freeze = useFreezeDataCut(trialId);
  const navigate = useNavigate();
  const initialValues: { cohortId: string; kind: CutKind } = { cohortId: trial.cohorts.length === 1 ? trial.cohorts[0].id : '', kind: 'interim' };
  return (
    <Formik
      initialValues={initialValues}
      validationSchema={createDataCutSchema}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          const { dataCut } = await freeze.mutateAsync({ cohortId: values.cohortId || null, kind: values.kind });
          void navigate(`/trials/${trialId}/data-cuts/${dataCut.id}`);
        } catch (error) {
          if (error instanceof ApiError) helpers.setErrors(error.fields);
        }
      }}
    >
      {({ isSubmitting }) => (
        <Form className="grid gap-3" aria-busy={isSubmitting}>
          <div className="grid gap-3 sm:grid-cols-2">
            <SelectField name="cohortId" label="Cohort">
              {trial.cohorts.length > 1 && <option value="">Whole trial (every cohort)</option>}
              {trial.cohorts.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.code} · {c.name}
                </option>
              ))}
            </SelectField>
            <SelectField name="kind" label="Analysis">
              <option value="interim">Interim analysis</option>
              <option value="final">Final analysis</option>
            </SelectField>
          </div>
          <p className="text-xs text-ink-500">
            Freezing copies every patient, outcome and assessment in scope as they stand now and seals the copy with a hash. Later corrections never change the cut.
          </p>
          <div className="flex items-center gap-3">
            <Button type="submit" disabled={isSubmitting}>
              Freeze a data cut
            </Button>
            {isSubmitting && (
              <>
                <progress aria-label="Freezing the data cut" className="h-2 w-40 accent-brass-500" />
                <Spinner label="Copying every patient and sealing the cut" />
              </>
            )}
          </div>
          {freeze.error && !(freeze.error instanceof ApiError && Object.keys(freeze.error.fields).length > 0) && (
            <ErrorNotice error={freeze.error} title="The data cut was not frozen" />
          )}
        </Form>
      )}
    </Formik>
  );
}

export function DataCutsPage() {
  const trial = useTrialContext();
  const { data, isPending, error } = useDataCuts(trial.id);
  const isStatistician = hasAnyRole(trial.myRoles, ['statistician']);
  const columns: ColumnDef<DataCutListItem, unknown>[] = [
    {
      id: 'seq',
      accessorKey: 'seq',
      header: 'Cut',
      cell: ({ row }) => (
        <Link to={row.original.id} className="font-semibold text-ink-900 underline underline-offset-2">
          Data cut {row.original.seq}
        </Link>
      ),
    },
    { id: 'kind', accessorKey: 'kind', header: 'Analysis', cell: ({ row }) => (row.original.kind === 'final' ? 'Final' : 'Interim') },
    { id: 'scope', accessorFn: (row) => row.cohorts.map((c) => c.code).join(', '), header: 'Cohorts' },
    { id: 'cutAt', accessorKey: 'cutAt', header: 'Cut at', cell: ({ row }) => dateTime(row.original.cutAt) },
    { id: 'patients', accessorFn: (row) => row.counts.patients, header: 'Patients' },
    { id: 'pending', accessorFn: (row) => row.counts.pending, header: 'Pending' },
    { id: 'unattested', accessorFn: (row) => row.counts.unattested, header: 'Unattested' },
    {
      id: 'signed',
      accessorKey: 'recommendationCount',
      header: 'Committee',
      cell: ({ row }) => (
        <span className="tabular-nums">
          <span aria-hidden>{row.original.recommendationCount > 0 ? GLYPHS.done : GLYPHS.pending} </span>
          {row.original.recommendationCount} of {data?.committeeSize ?? 0} signed
        </span>
      ),
    },
    {
      id: 'decision',
      accessorKey: 'decisionCount',
      header: 'Decision',
      cell: ({ row }) => (row.original.decisionCount > 0 ? <span><span aria-hidden>{GLYPHS.done} </span>Applied</span> : <span><span aria-hidden>{GLYPHS.pending} </span>Not yet</span>),
    },
    {
      id: 'open',
      header: '',
      enableSorting: false,
      cell: ({ row }) => (
        <span className="flex gap-3 whitespace-nowrap">
          <Link to={row.original.id} className="underline underline-offset-2">
            Analysis
          </Link>
          <Link to={`${row.original.id}/review`} className="underline underline-offset-2">
            Committee review
          </Link>
        </span>
      ),
    },
  ];
  return (
    <div className="grid gap-4">
      <PageHeader title="Data cuts" subtitle="Frozen snapshots of the trial's patients and outcomes, each analysed exactly as it was cut." />
      {isStatistician && (
        <Panel title="Freeze a data cut">
          <FreezeForm trialId={trial.id} />
        </Panel>
      )}
      <Panel title="Cuts of this trial">
        {isPending ? (
          <Loading label="Loading the data cuts" />
        ) : error ? (
          <ErrorNotice error={error} />
        ) : (
          <DataTable
            data={data.dataCuts}
            columns={columns}
            label="Data cuts"
            filterLabel="Filter the cuts"
            empty="No data cut yet."
            initialSorting={[{ id: 'seq', desc: true }]}
          />
        )}
      </Panel>
      <Cautions />
    </div>
  );
}
