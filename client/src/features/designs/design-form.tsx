/**
 * p0, p1, α, β, nmax, the protocol settings and the cohort's safety rule (the toxicity definition
 * with a continuous boundary or a Bryant–Day design), validated as you type by the schema the
 * server uses.
 */
import { useFormikContext } from 'formik';
import { Button } from '../../components/ui';
import { CheckboxField, SelectField, TextField } from '../../components/field';
import { ANALYSIS_POPULATIONS, INTERIM_ACCRUAL, NMAX_LIMIT } from '../../../../server/designs/designs.schema';
import { BRYANT_DAY_NMAX_LIMIT, CTCAE_GRADES, SAFETY_RULES, WINDOW_DAYS_MAX } from '../../../../server/safety/safety.schema';
import { GRADE_WORDS, INTERIM_ACCRUAL_LABELS, POPULATION_LABELS, SAFETY_RULE_WORDS } from '../../../../server/words';
import type { StudioValues } from './url-state';

const SETTINGS = ['p0', 'p1', 'alpha', 'beta', 'nmax'] as const;
/** The fields each safety rule adds to what a comparison needs. */
const RULE_SETTINGS = {
  none: [],
  toxicity_boundary: ['toxMinGrade', 'toxWindowDays', 'toxTheta', 'toxAlpha'],
  bryant_day: ['toxMinGrade', 'toxWindowDays', 'toxAcceptable', 'toxUnacceptable', 'alphaT'],
} as const satisfies Record<StudioValues['safetyRule'], ReadonlyArray<keyof StudioValues>>;

export function DesignForm({ onCompare, computing }: { onCompare: (values: StudioValues) => void; computing: boolean }) {
  const { values, errors, setTouched, touched, validateForm } = useFormikContext<StudioValues>();
  const needed = [...SETTINGS, ...RULE_SETTINGS[values.safetyRule]];
  const compare = async () => {
    await setTouched({ ...touched, ...Object.fromEntries(needed.map((key) => [key, true])) });
    const found = await validateForm();
    if (needed.every((key) => !found[key])) onCompare(values);
  };
  const settingsInvalid = needed.some((key) => errors[key]);
  const bryantDay = values.safetyRule === 'bryant_day';
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
        <TextField
          name="nmax"
          label="nmax"
          type="number"
          step="1"
          min="2"
          max={bryantDay ? BRYANT_DAY_NMAX_LIMIT : NMAX_LIMIT}
          hint={`Largest size searched (≤ ${bryantDay ? BRYANT_DAY_NMAX_LIMIT : NMAX_LIMIT})`}
        />
      </fieldset>
      <fieldset className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <legend className="mb-2 text-xs font-semibold tracking-wide text-ink-500 uppercase">Safety rule</legend>
        <div className="col-span-2 sm:col-span-4">
          <SelectField
            name="safetyRule"
            label="What the cohort monitors"
            hint={bryantDay ? 'Bryant–Day: p0, p1, α and β above are the response rates, αR and β.' : 'Toxicity is recorded as adverse events either way.'}
          >
            {SAFETY_RULES.map((rule) => (
              <option key={rule} value={rule}>
                {SAFETY_RULE_WORDS[rule]}
              </option>
            ))}
          </SelectField>
        </div>
        {values.safetyRule !== 'none' && (
          <>
            <SelectField name="toxMinGrade" label="Toxicity from grade" hint="CTCAE v5.0; attribution possible or stronger.">
              {CTCAE_GRADES.map((grade) => (
                <option key={grade} value={grade}>
                  {grade} · {GRADE_WORDS[grade]}
                </option>
              ))}
            </SelectField>
            <TextField name="toxWindowDays" label="Window (days)" type="number" step="1" min="1" max={WINDOW_DAYS_MAX} hint="Onset within this many days of enrolment (the first dose)." />
          </>
        )}
        {values.safetyRule === 'toxicity_boundary' && (
          <>
            <TextField name="toxTheta" label={<span className="normal-case">θ</span>} type="number" step="0.01" min="0" max="1" hint="Acceptable toxicity rate" />
            <TextField name="toxAlpha" label={<span className="normal-case">Boundary α</span>} type="number" step="0.01" min="0" max="1" hint="Chance of stopping at θ" />
          </>
        )}
        {bryantDay && (
          <>
            <TextField name="toxAcceptable" label="Acceptable toxicity" type="number" step="0.01" min="0" max="1" />
            <TextField name="toxUnacceptable" label="Unacceptable toxicity" type="number" step="0.01" min="0" max="1" />
            <TextField name="alphaT" label={<span className="normal-case">αT</span>} type="number" step="0.01" min="0" max="1" hint="Promising despite unacceptable toxicity" />
          </>
        )}
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
        <span className="text-xs text-ink-500">
          {bryantDay ? 'Exact search over every Bryant–Day design up to nmax.' : 'Exact search over every single- and two-stage design up to nmax.'}
        </span>
      </div>
    </form>
  );
}
