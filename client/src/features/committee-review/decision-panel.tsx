/**
 * The statistician applies the committee's decision: resume accrual for stage 2, stop with a
 * category and reason, go to the final analysis, complete, or resume accrual after a safety pause.
 * Sites and sponsors are e-mailed.
 */
import { Form, Formik } from 'formik';
import { Button, DecisionCaution, ErrorNotice } from '../../components/ui';
import { SelectField, TextAreaField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { DECISION_ACTIONS, STOP_CATEGORIES, decisionChoices, decisionSchema, type DecisionAction } from '../../../../server/data-cuts/data-cuts.schema';
import { DECISION_POINT_CAUTIONS, DECISION_WORDS, GLYPHS, STOP_CATEGORY_LABELS } from '../../../../server/words';
import type { DataCutDetail } from '../data-cuts';
import { useApplyDecision } from './use-apply-decision';

type Values = { action: DecisionAction | ''; cohortId: string; stopCategory: string; reason: string };

export function DecisionPanel({ detail, trialId }: { detail: DataCutDetail; trialId: string }) {
  const apply = useApplyDecision(detail.dataCut.id, trialId);
  const cohorts = detail.dataCut.snapshot.cohorts;
  const decided = new Set(detail.decisions.map((d) => d.cohortId));
  const open = cohorts.filter((c) => !decided.has(c.id));
  const waitingForCommittee = detail.dataCut.kind === 'interim' && detail.recommendations.length === 0;
  if (open.length === 0) return <p className="text-sm text-ink-600">A decision has been applied to every cohort of this cut.</p>;
  return (
    <Formik<Values>
      initialValues={{ action: '', cohortId: open.length === 1 ? open[0].id : '', stopCategory: '', reason: '' }}
      validationSchema={decisionSchema}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          await apply.mutateAsync({
            action: values.action as DecisionAction,
            cohortId: values.cohortId || null,
            stopCategory: values.action === 'stop' ? (values.stopCategory as (typeof STOP_CATEGORIES)[number]) : null,
            reason: values.reason,
          });
          helpers.resetForm();
        } catch (error) {
          if (error instanceof ApiError) helpers.setErrors(error.fields);
        }
      }}
    >
      {({ values, isSubmitting }) => {
        const cohort = cohorts.find((c) => c.id === values.cohortId);
        // Resuming for stage 2 is offered only where the chosen cohort (or, before one is chosen, some open cohort) has a stage 2 ahead.
        const actions = cohort ? decisionChoices(cohort) : DECISION_ACTIONS.filter((action) => open.some((c) => decisionChoices(c).includes(action)));
        return (
          <Form className="grid gap-3" aria-label="Apply the decision">
            {waitingForCommittee && (
              <p role="status" className="text-sm text-ink-700">
                <span aria-hidden>{GLYPHS.pending} </span>No committee member has signed yet: an interim decision can be applied once at least one recommendation is signed.
              </p>
            )}
            <div className="grid gap-3 sm:grid-cols-3">
              {cohorts.length > 1 && (
                <SelectField name="cohortId" label="Cohort">
                  <option value="">Choose a cohort</option>
                  {open.map((c) => (
                    <option key={c.id} value={c.id}>
                      {c.code} · {c.name}
                    </option>
                  ))}
                </SelectField>
              )}
              <SelectField name="action" label="Decision">
                <option value="">Choose the decision</option>
                {actions.map((action) => (
                  <option key={action} value={action}>
                    {DECISION_WORDS[action].glyph} {DECISION_WORDS[action].label}
                  </option>
                ))}
              </SelectField>
              {values.action === 'stop' && (
                <SelectField name="stopCategory" label="Why it stops">
                  <option value="">Choose the category</option>
                  {STOP_CATEGORIES.map((category) => (
                    <option key={category} value={category}>
                      {STOP_CATEGORY_LABELS[category]}
                    </option>
                  ))}
                </SelectField>
              )}
            </div>
            <TextAreaField name="reason" label="Reason" hint="Recorded in the audit trail and sent to the sites and sponsors." />
            <DecisionCaution>{values.action === 'stop' ? DECISION_POINT_CAUTIONS.stopCohort : DECISION_POINT_CAUTIONS.applyDecision}</DecisionCaution>
            <div>
              <Button type="submit" variant={values.action === 'stop' ? 'danger' : 'primary'} disabled={isSubmitting || waitingForCommittee}>
                {isSubmitting ? 'Applying…' : 'Apply the decision'}
              </Button>
            </div>
            {apply.error && !(apply.error instanceof ApiError && Object.keys(apply.error.fields).length > 0) && (
              <ErrorNotice error={apply.error} title="The decision was not applied" />
            )}
          </Form>
        );
      }}
    </Formik>
  );
}
