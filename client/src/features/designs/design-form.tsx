/** p0, p1, α, β, nmax and the protocol settings, validated as you type by the schema the server uses. */
import { useFormikContext } from 'formik';
import { Button } from '../../components/ui';
import { CheckboxField, SelectField, TextField } from '../../components/field';
import { ANALYSIS_POPULATIONS, INTERIM_ACCRUAL, NMAX_LIMIT } from '../../../../server/designs/designs.schema';
import { INTERIM_ACCRUAL_LABELS, POPULATION_LABELS } from '../../../../server/words';
import type { StudioValues } from './url-state';

const SETTINGS = ['p0', 'p1', 'alpha', 'beta', 'nmax'] as const;

export function DesignForm({ onCompare, computing }: { onCompare: (values: StudioValues) => void; computing: boolean }) {
  const { values, errors, setTouched, touched, validateForm } = useFormikContext<StudioValues>();
  const compare = async () => {
    await setTouched({ ...touched, ...Object.fromEntries(SETTINGS.map((key) => [key, true])) });
    const found = await validateForm();
    if (SETTINGS.every((key) => !found[key])) onCompare(values);
  };
  const settingsInvalid = SETTINGS.some((key) => errors[key]);
  return (
    <form
      noValidate
      onSubmit={(event) => {
        event.preventDefault();
        void compare();
      }}
      className="grid gap-4"
    >
      <fieldset className="grid grid-cols-2 gap-3 sm:grid-cols-5">
        <legend className="mb-2 text-xs font-semibold tracking-wide text-ink-500 uppercase">Hypotheses and errors</legend>
        <TextField name="p0" label="p0" type="number" step="0.01" min="0" max="1" hint="Null response rate" />
        <TextField name="p1" label="p1" type="number" step="0.01" min="0" max="1" hint="Target response rate" />
        <TextField name="alpha" label={<span className="normal-case">α</span>} type="number" step="0.01" min="0" max="1" hint="Type I error" />
        <TextField name="beta" label={<span className="normal-case">β</span>} type="number" step="0.01" min="0" max="1" hint="Type II error" />
        <TextField name="nmax" label="nmax" type="number" step="1" min="2" max={NMAX_LIMIT} hint={`Largest size searched (≤ ${NMAX_LIMIT})`} />
      </fieldset>
      <fieldset className="grid gap-3 sm:grid-cols-2">
        <legend className="mb-2 text-xs font-semibold tracking-wide text-ink-500 uppercase">Protocol settings</legend>
        <SelectField name="analysisPopulation" label="Analysis population" hint="Who n1 and n count.">
          {ANALYSIS_POPULATIONS.map((population) => (
            <option key={population} value={population}>
              {POPULATION_LABELS[population]}
            </option>
          ))}
        </SelectField>
        <SelectField name="interimAccrual" label="Accrual at the interim" hint="When n1 patients are enrolled.">
          {INTERIM_ACCRUAL.map((choice) => (
            <option key={choice} value={choice}>
              {INTERIM_ACCRUAL_LABELS[choice]}
            </option>
          ))}
        </SelectField>
        <TextField name="protocolReference" label="Protocol reference" placeholder="e.g. PRT-001 v1.0" hint="Named in the signature." />
        <div className="self-end">
          <CheckboxField
            name="sponsorSeesResponse"
            label="Sponsors may see response figures"
            hint="Otherwise only after the committee releases them."
          />
        </div>
      </fieldset>
      <div className="flex items-center gap-3">
        <Button type="submit" disabled={computing || settingsInvalid}>
          {computing ? 'Searching…' : 'Compare designs'}
        </Button>
        <span className="text-xs text-ink-500">Exact search over every single- and two-stage design up to nmax.</span>
      </div>
    </form>
  );
}
