/**
 * Designs: one tab per cohort. The statistician compares candidate designs for p0, p1, α, β
 * and nmax — response designs, with a continuous toxicity boundary when the cohort's safety rule
 * has one, or Bryant–Day designs of response and toxicity — signs one (version 1), signs new
 * versions with a reason, and opens accrual; the trial manager and the committee read the design
 * in force and its signed history.
 */
import { useState, type KeyboardEvent } from 'react';
import { useSearchParams } from 'react-router-dom';
import { Formik, useFormikContext } from 'formik';
import { Cautions, EmptyState, ErrorNotice, Loading, PageHeader, Panel, Spinner, StatusTag } from '../../components/ui';
import { designFormSchema, type SignatureKind } from '../../../../server/designs/designs.schema';
import { useTrialContext, type Trial } from '../trials';
import { useDesigns } from './get-designs';
import { useDesignCandidates } from './get-design-candidates';
import { useSafetyDesigns } from './get-safety-designs';
import { DesignForm } from './design-form';
import { CandidatesPanel } from './candidates-panel';
import { BryantDayPanel } from './bryant-day-panel';
import { BoundaryPanel } from './boundary-panel';
import { SignDialog } from './sign-dialog';
import { LockedDesign } from './locked-design';
import { VersionHistory } from './version-history';
import { CohortStatusPanel } from './cohort-status-panel';
import { bryantDayCandidates, candidateList, type CandidateDesign, type CohortDesigns } from './types';
import { comparedBoundary, comparedSafetySettings, comparedSettings, initialValues, responseSettingsOf, sameAsCompared, withValues, type StudioValues } from './url-state';
import { GLYPHS } from '../../../../server/words';

export function DesignsPage() {
  const trial = useTrialContext();
  const { data: cohorts, isPending, error } = useDesigns(trial.id);
  const [params, setParams] = useSearchParams();
  if (isPending) return <Loading label="Loading the designs" />;
  if (error) return <ErrorNotice error={error} title="The designs could not be loaded" />;
  if (cohorts.length === 0) return <EmptyState>This trial has no cohort yet. A trial manager adds cohorts on the trial’s set-up.</EmptyState>;
  const selected = cohorts.find((c) => c.id === params.get('cohort')) ?? cohorts[0];
  const choose = (cohortId: string) => setParams({ cohort: cohortId });
  const onTabKey = (event: KeyboardEvent<HTMLButtonElement>, index: number) => {
    const step = event.key === 'ArrowRight' ? 1 : event.key === 'ArrowLeft' ? -1 : 0;
    if (!step) return;
    const next = cohorts[(index + step + cohorts.length) % cohorts.length];
    choose(next.id);
    document.getElementById(`cohort-tab-${next.id}`)?.focus();
  };
  return (
    <div>
      <PageHeader title="Designs: compare, lock and amend" subtitle="Compare exact single- and two-stage designs, lock one with your signature, amend it with a reason." />
      {cohorts.length > 1 && (
        <div role="tablist" aria-label="Cohorts" className="mb-4 flex flex-wrap gap-1 border-b border-ink-200">
          {cohorts.map((cohort, index) => (
            <button
              key={cohort.id}
              id={`cohort-tab-${cohort.id}`}
              type="button"
              role="tab"
              aria-selected={cohort.id === selected.id}
              aria-controls="cohort-panel"
              tabIndex={cohort.id === selected.id ? 0 : -1}
              onClick={() => choose(cohort.id)}
              onKeyDown={(event) => onTabKey(event, index)}
              className={`-mb-px flex items-center gap-2 border-b-2 px-3 py-2 text-sm ${cohort.id === selected.id ? 'border-brass-500 font-semibold text-ink-950' : 'border-transparent text-ink-500 hover:text-ink-900'}`}
            >
              <span className="font-mono text-xs">{cohort.code}</span> {cohort.name}
              <StatusTag status={cohort.status} />
            </button>
          ))}
        </div>
      )}
      <div id="cohort-panel" role={cohorts.length > 1 ? 'tabpanel' : undefined} aria-labelledby={cohorts.length > 1 ? `cohort-tab-${selected.id}` : undefined}>
        <Formik key={selected.id} initialValues={initialValues(params, selected.versions[0])} validationSchema={designFormSchema} onSubmit={() => undefined}>
          <CohortWorkspace trial={trial} cohort={selected} />
        </Formik>
      </div>
    </div>
  );
}

function CohortWorkspace({ trial, cohort }: { trial: Trial; cohort: CohortDesigns }) {
  const [params, setParams] = useSearchParams();
  const formik = useFormikContext<StudioValues>();
  const [chooseProblem, setChooseProblem] = useState<string | null>(null);
  const isStatistician = trial.myRoles.includes('statistician');
  const isAdmin = trial.myRoles.includes('admin');
  const current = cohort.versions[0];
  const finished = cohort.status === 'stopped' || cohort.status === 'completed';
  const canSign = isStatistician && !finished;
  const kind: SignatureKind = !current ? 'lock' : cohort.enrolled > 0 ? 'amendment' : 'revision';
  const settings = isStatistician ? comparedSettings(params) : null;
  const safetySettings = isStatistician ? comparedSafetySettings(params) : null;
  const boundary = isStatistician ? comparedBoundary(params) : null;
  const candidates = useDesignCandidates(trial.id, settings);
  const safetyCandidates = useSafetyDesigns(trial.id, safetySettings);
  const bryantDayList = safetyCandidates.data ? bryantDayCandidates(safetyCandidates.data) : [];
  // Held here for an immediate tick in the checkbox, and mirrored into the address for a shared link.
  const [compare, setCompare] = useState(() => (params.get('compare') ?? '').split(',').filter(Boolean));
  const signable = safetySettings ? bryantDayList : candidates.data ? candidateList(candidates.data) : [];
  const signing = params.get('sign') ? signable.find((c) => c.key === params.get('sign')) : undefined;
  const signedSettings = safetySettings ? responseSettingsOf(safetySettings) : candidates.data?.settings;

  const update = (change: (next: URLSearchParams) => void) =>
    setParams(
      (previous) => {
        const next = new URLSearchParams(previous);
        next.set('cohort', cohort.id);
        change(next);
        return next;
      },
      { replace: true },
    );

  const onChoose = async (candidate: CandidateDesign) => {
    setChooseProblem(null);
    await formik.setTouched(Object.fromEntries(Object.keys(formik.values).map((key) => [key, true])));
    const errors = await formik.validateForm();
    if (Object.keys(errors).length > 0) {
      setChooseProblem('Complete the design settings and protocol settings above before signing.');
      return;
    }
    if (!sameAsCompared(formik.values, params)) {
      setChooseProblem('The settings changed since the comparison: compare designs again before signing.');
      return;
    }
    update((next) => {
      withValues(next, formik.values).forEach((value, key) => next.set(key, value));
      next.set('sign', candidate.key);
    });
  };

  const chooseLabel = kind === 'lock' ? 'Lock…' : kind === 'amendment' ? 'Amend to this…' : 'Sign as new version…';

  return (
    <div className="grid gap-4">
      <div className="grid gap-4 lg:grid-cols-5">
        {isStatistician && !finished && (
          <Panel title={current ? 'New version of the design' : 'Design settings'} className="lg:col-span-3">
            <DesignForm
              computing={candidates.isFetching || safetyCandidates.isFetching}
              onCompare={(values) =>
                update((next) => {
                  withValues(next, values).forEach((value, key) => next.set(key, value));
                  next.set('run', '1');
                  next.delete('sign');
                })
              }
            />
          </Panel>
        )}
        <Panel title={`Cohort ${cohort.code} status`} className={isStatistician && !finished ? 'lg:col-span-2' : 'lg:col-span-5'}>
          <CohortStatusPanel trialId={trial.id} cohort={cohort} isStatistician={isStatistician} isAdmin={isAdmin} />
        </Panel>
      </div>

      <Panel title="Design in force">
        {current ? <LockedDesign cohort={cohort} design={current} /> : <EmptyState>No design is locked for this cohort yet.</EmptyState>}
      </Panel>

      {isStatistician && safetySettings && (
        <Panel title="Bryant–Day designs: response and toxicity">
          {safetyCandidates.error ? (
            <ErrorNotice error={safetyCandidates.error} title="No Bryant–Day design for these settings" />
          ) : !safetyCandidates.data ? (
            <Loading label="Searching every Bryant–Day design up to nmax" />
          ) : (
            <div className={safetyCandidates.isFetching ? 'opacity-60' : undefined} aria-busy={safetyCandidates.isFetching}>
              {chooseProblem && <ErrorNotice error={new Error(chooseProblem)} title="Not ready to sign" />}
              <BryantDayPanel
                trialId={trial.id}
                candidates={bryantDayList}
                settings={safetySettings}
                computing={safetyCandidates.isFetching}
                onChoose={canSign ? (candidate) => void onChoose(candidate) : undefined}
                chooseLabel={chooseLabel}
              />
            </div>
          )}
        </Panel>
      )}

      {isStatistician && settings && (
        <Panel
          title="Candidate designs"
          actions={candidates.isFetching ? <Spinner label="Searching every design up to nmax" /> : undefined}
        >
          {candidates.error ? (
            <ErrorNotice error={candidates.error} title="No designs for these settings" />
          ) : !candidates.data ? (
            <Loading label="Searching every design up to nmax" />
          ) : (
            <div className={candidates.isFetching ? 'opacity-60' : undefined} aria-busy={candidates.isFetching}>
              {chooseProblem && <ErrorNotice error={new Error(chooseProblem)} title="Not ready to sign" />}
              {kind === 'amendment' && canSign && (
                <p className="mb-3 text-sm text-ink-600">
                  <span aria-hidden>{GLYPHS.note} </span>
                  {cohort.enrolled} patient{cohort.enrolled === 1 ? ' is' : 's are'} enrolled: a change now is an amendment, with a reason and
                  a new signature. The earlier versions stay on record.
                </p>
              )}
              <CandidatesPanel
                candidates={candidates.data}
                compare={compare}
                onToggleCompare={(key) => {
                  const chosen = compare.includes(key) ? compare.filter((k) => k !== key) : [...compare, key].slice(-2);
                  setCompare(chosen);
                  update((next) => (chosen.length > 0 ? next.set('compare', chosen.join(',')) : next.delete('compare')));
                }}
                onChoose={canSign ? (candidate) => void onChoose(candidate) : undefined}
                chooseLabel={chooseLabel}
              />
            </div>
          )}
        </Panel>
      )}

      {isStatistician && boundary && candidates.data && (
        <Panel title="Continuous toxicity boundary">
          <BoundaryPanel trialId={trial.id} candidates={candidateList(candidates.data)} theta={boundary.theta} alpha={boundary.alpha} />
        </Panel>
      )}

      <Panel title="Version history">
        {cohort.versions.length === 0 ? <EmptyState>No signed version yet.</EmptyState> : <VersionHistory versions={cohort.versions} />}
      </Panel>

      <Cautions />

      {signing && canSign && signedSettings && (
        <SignDialog
          trialId={trial.id}
          trialCode={trial.code}
          cohort={cohort}
          candidate={signing}
          settings={signedSettings}
          values={formik.values}
          kind={kind}
          currentVersion={current?.version ?? 0}
          returnTo={`${window.location.pathname}${window.location.search}`}
          onClose={() => update((next) => next.delete('sign'))}
          onSigned={() => update((next) => next.delete('sign'))}
        />
      )}
    </div>
  );
}
