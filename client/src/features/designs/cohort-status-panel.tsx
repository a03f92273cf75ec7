/**
 * The start of the cohort's life: the statistician opens accrual once a design is locked; the
 * statistician, or the trial manager for reasons that are not statistical, may stop the cohort.
 * The other moves (interim review, stage 2, final analysis) happen on the Patients and Data cut pages.
 */
import { useState } from 'react';
import { Form, Formik } from 'formik';
import { Button, DecisionCaution, ErrorNotice, SafetyPauseTag, StatusTag } from '../../components/ui';
import { SelectField, TextAreaField } from '../../components/field';
import { dateTime } from '../../lib/format';
import { cohortTransitionSchema } from '../../../../server/designs/designs.schema';
import { STOP_CATEGORIES, type StopCategory } from '../../../../server/trials/trials.schema';
import { DECISION_POINT_CAUTIONS, STOP_CATEGORY_LABELS, stoppedFor } from '../../../../server/words';
import { useTransitionCohort } from './use-transition-cohort';
import type { CohortDesigns } from './types';

/** Categories only the statistician records: they follow the analysis. */
const STATISTICAL: readonly StopCategory[] = ['futility', 'efficacy'];

export function CohortStatusPanel({ trialId, cohort, isStatistician, isAdmin }: { trialId: string; cohort: CohortDesigns; isStatistician: boolean; isAdmin: boolean }) {
  const transition = useTransitionCohort(trialId, cohort.id);
  const [confirmOpen, setConfirmOpen] = useState(false);
  const [stopOpen, setStopOpen] = useState(false);
  const locked = cohort.versions.length > 0;
  const finished = cohort.status === 'stopped' || cohort.status === 'completed';
  const categories = isStatistician ? STOP_CATEGORIES : STOP_CATEGORIES.filter((c) => !STATISTICAL.includes(c));
  return (
    <div className="grid gap-3 text-sm">
      <p className="flex flex-wrap items-center gap-2">
        <StatusTag status={cohort.status} /> since {dateTime(cohort.statusChangedAt)}
        {cohort.safetyPause && <SafetyPauseTag />}
      </p>
      {cohort.safetyPause && (
        <p>
          Since {dateTime(cohort.safetyPause.since)}: {cohort.safetyPause.reason} Accrual resumes when the statistician applies the committee’s decision on a data cut of
          this cohort.
        </p>
      )}
      {cohort.status === 'stopped' && (
        <p>
          Stopped {stoppedFor(cohort.stopCategory)}: {cohort.stopReason}
        </p>
      )}
      {transition.error && <ErrorNotice error={transition.error} title="The cohort did not move" />}
      {isStatistician && cohort.status === 'draft' && (
        <div className="grid gap-2">
          {!locked && <p className="text-ink-500">Accrual opens once a design is locked and signed.</p>}
          {!confirmOpen ? (
            <div>
              <Button disabled={!locked} onClick={() => setConfirmOpen(true)}>
                Open accrual
              </Button>
            </div>
          ) : (
            <div role="group" aria-label="Confirm opening accrual" className="flex flex-wrap items-center gap-2">
              <span>Open accrual for cohort {cohort.code}? Sites can then enrol patients.</span>
              <Button
                disabled={transition.isPending}
                onClick={() => transition.mutate({ to: 'enrolling_stage_1', from: 'draft' }, { onSuccess: () => setConfirmOpen(false) })}
              >
                {transition.isPending ? 'Opening…' : 'Confirm'}
              </Button>
              <Button variant="secondary" onClick={() => setConfirmOpen(false)}>
                Cancel
              </Button>
            </div>
          )}
        </div>
      )}
      {(isStatistician || isAdmin) && !finished && (
        <div>
          {!stopOpen ? (
            <Button variant="quiet" onClick={() => setStopOpen(true)}>
              Stop this cohort…
            </Button>
          ) : (
            <Formik
              initialValues={{ to: 'stopped', stopCategory: isStatistician ? 'futility' : 'sponsor', reason: '' }}
              validationSchema={cohortTransitionSchema}
              onSubmit={(values) =>
                transition
                  .mutateAsync({ ...values, from: cohort.status })
                  .then(() => setStopOpen(false))
                  // The failure is shown from the mutation's own error above.
                  .catch(() => undefined)
              }
            >
              {({ isSubmitting }) => (
                <Form noValidate className="grid max-w-lg gap-3 border border-alert-600/30 p-3">
                  <SelectField name="stopCategory" label="Why the cohort stops">
                    {categories.map((c) => (
                      <option key={c} value={c}>
                        {STOP_CATEGORY_LABELS[c]}
                      </option>
                    ))}
                  </SelectField>
                  <TextAreaField name="reason" label="Reason" hint="Recorded in the audit trail." />
                  {!isStatistician && <p className="text-xs text-ink-500">Stopping for futility or efficacy follows the statistician’s analysis and is recorded by the statistician.</p>}
                  <DecisionCaution>{DECISION_POINT_CAUTIONS.stopCohort}</DecisionCaution>
                  <div className="flex gap-2">
                    <Button type="submit" variant="danger" disabled={isSubmitting}>
                      {isSubmitting ? 'Stopping…' : 'Stop the cohort'}
                    </Button>
                    <Button variant="secondary" onClick={() => setStopOpen(false)}>
                      Cancel
                    </Button>
                  </div>
                </Form>
              )}
            </Formik>
          )}
        </div>
      )}
      <p className="text-xs text-ink-500">Interim review, stage 2 and the final analysis are recorded on the Patients and Data cut pages.</p>
    </div>
  );
}
