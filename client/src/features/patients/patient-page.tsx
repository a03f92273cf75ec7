/** One patient: identity, the outcome form, the investigator's attestation, assessments, history and adverse events. */
import { Link, useParams } from 'react-router-dom';
import { ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { day } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { useTrialContext } from '../trials';
import { AssessmentsPanel } from '../assessments';
import { AdverseEventsPanel } from '../safety';
import { usePatient } from './get-patient';
import { OutcomeForm } from './outcome-form';
import { AttestationPanel } from './attestation-panel';
import { HistoryList } from './history-list';
import { GLYPHS } from '../../../../server/words';

export function PatientPage() {
  const trial = useTrialContext();
  const { patientId = '' } = useParams();
  const { data: patient, isPending, error } = usePatient(trial.id, patientId);
  if (isPending) return <Loading label="Loading the patient" />;
  if (error) return <ErrorNotice error={error} title="This patient could not be opened" />;
  const atMySite = trial.mySiteIds.includes(patient.siteId);
  const canWrite = atMySite && hasAnyRole(trial.myRoles, ['coordinator', 'investigator']);
  const canAttest = atMySite && hasAnyRole(trial.myRoles, ['investigator']);
  return (
    <div className="grid gap-4">
      <PageHeader
        title={<span className="font-mono">{patient.studyId}</span>}
        subtitle={`Site ${patient.siteCode} · cohort ${patient.cohortCode} · stage ${patient.stage} · enrolled ${day(patient.enrolledOn)} · version ${patient.version}`}
        actions={
          <Link to=".." relative="path" className="text-sm text-ink-700 underline-offset-2 hover:underline">
            {GLYPHS.back} All patients
          </Link>
        }
      />
      <div className="grid gap-4 lg:grid-cols-3">
        <Panel title="Outcome" className="lg:col-span-2">
          <OutcomeForm key={patient.id} trialId={trial.id} patient={patient} canWrite={canWrite} derived={trial.protocolSettings.outcomeSource === 'derived'} />
        </Panel>
        <Panel title="Attestation">
          <AttestationPanel trialId={trial.id} patient={patient} canAttest={canAttest} />
        </Panel>
        <div className="lg:col-span-2">
          <AssessmentsPanel trialId={trial.id} patientId={patient.id} />
        </div>
        <Panel title="History">
          <HistoryList trialId={trial.id} patientId={patient.id} />
        </Panel>
        <div className="lg:col-span-3">
          <AdverseEventsPanel trialId={trial.id} patientId={patient.id} canWrite={canWrite} canAttest={canAttest} />
        </div>
      </div>
    </div>
  );
}
