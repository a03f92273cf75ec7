/**
 * The statistician's prior for the Bayesian figures of a cut: try a Beta(a, b) and θT on this page,
 * or save it on the cut (audited). Empty a and b mean the stated default, Beta(p0, 1 − p0).
 */
import { Form, Formik, type FormikErrors } from 'formik';
import { ValidationError } from 'yup';
import { Button, ErrorNotice } from '../../components/ui';
import { TextField } from '../../components/field';
import { ApiError } from '../../lib/api';
import { priorSchema } from '../../../../server/data-cuts/data-cuts.schema';
import { useSavePrior } from './use-save-prior';
import type { DataCut, PriorQuery } from './types';

type Values = { a: string; b: string; thetaT: string };

const toInput = (values: Values, version: number) => ({
  a: values.a.trim() === '' ? null : Number(values.a),
  b: values.b.trim() === '' ? null : Number(values.b),
  thetaT: values.thetaT.trim() === '' ? undefined : Number(values.thetaT),
  version,
});

function validate(values: Values, version: number): FormikErrors<Values> {
  try {
    priorSchema.validateSync(toInput(values, version), { abortEarly: false });
    return {};
  } catch (error) {
    if (!(error instanceof ValidationError)) throw error;
    return Object.fromEntries(error.inner.map((e) => [e.path, e.message]));
  }
}

export function PriorEditor({ cut, onTry }: { cut: DataCut; onTry: (prior: PriorQuery) => void }) {
  const save = useSavePrior(cut.id);
  const initial: Values = { a: cut.prior.a?.toString() ?? '', b: cut.prior.b?.toString() ?? '', thetaT: cut.prior.thetaT.toString() };
  return (
    <Formik
      initialValues={initial}
      enableReinitialize
      validate={(values) => validate(values, cut.version)}
      validateOnChange
      onSubmit={async (values, helpers) => {
        try {
          const input = priorSchema.cast(toInput(values, cut.version));
          await save.mutateAsync({ ...input, a: input.a ?? null, b: input.b ?? null });
          onTry({});
        } catch (error) {
          if (error instanceof ApiError) helpers.setErrors(error.fields);
        }
      }}
    >
      {({ values, isValid, isSubmitting }) => (
        <Form className="grid gap-3" aria-label="Prior for the Bayesian figures">
          <div className="grid grid-cols-3 gap-3">
            <TextField name="a" label="Beta a" inputMode="decimal" hint="Empty: p0" />
            <TextField name="b" label="Beta b" inputMode="decimal" hint="Empty: 1 − p0" />
            <TextField name="thetaT" label="θT (success threshold)" inputMode="decimal" />
          </div>
          <div className="flex flex-wrap gap-2">
            <Button
              variant="secondary"
              disabled={!isValid}
              onClick={() => {
                const input = toInput(values, cut.version);
                onTry({ ...(input.a !== null && input.b !== null ? { a: input.a, b: input.b } : {}), thetaT: input.thetaT });
              }}
            >
              Try on this page
            </Button>
            <Button type="submit" disabled={!isValid || isSubmitting}>
              {isSubmitting ? 'Saving…' : 'Save on the data cut'}
            </Button>
          </div>
          {save.error && !(save.error instanceof ApiError && Object.keys(save.error.fields).length > 0) && <ErrorNotice error={save.error} title="The prior was not saved" />}
        </Form>
      )}
    </Formik>
  );
}
