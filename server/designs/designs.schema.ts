/**
 * Payloads of the Designs page, shared by the server's routes and the client's forms (the client
 * imports this file directly, so it holds nothing but Yup and plain functions).
 */
import { boolean, number, object, string, type InferType } from 'yup';
import { COHORT_STATUSES, STOP_CATEGORIES } from '../trials/trials.schema.js';
import { BRYANT_DAY_NMAX_LIMIT, SAFETY_RULES, toxicityDefinitionFields } from '../safety/safety.schema.js';

// Kept for the client, which imports it from here.
export { COHORT_STATUSES };

/** The exhaustive two-stage search grows as nmax⁴; above this it would take too long to offer. */
export const NMAX_LIMIT = 200;

export const SELECTIONS = ['single_stage', 'optimal', 'minimax', 'admissible'] as const;
export type Selection = (typeof SELECTIONS)[number];
export const ANALYSIS_POPULATIONS = ['all_enrolled', 'evaluable'] as const;
export const INTERIM_ACCRUAL = ['pause', 'continue_at_risk'] as const;

const rate = (label: string) =>
  number()
    .typeError(`${label} must be a number.`)
    .required(`${label} is required.`)
    .moreThan(0, `${label} must be above 0.`)
    .lessThan(1, `${label} must be below 1.`);

export const designSettingsSchema = object({
  p0: rate('p0'),
  p1: rate('p1').test('above-p0', 'p1 must be greater than p0: the design tests for an improvement.', function (value) {
    const p0 = this.parent.p0;
    return typeof value !== 'number' || typeof p0 !== 'number' || value > p0;
  }),
  alpha: rate('α'),
  beta: rate('β').test('alpha-plus-beta', 'α + β must be less than 1.', function (value) {
    const alpha = this.parent.alpha;
    return typeof value !== 'number' || typeof alpha !== 'number' || alpha + value < 1;
  }),
  nmax: number()
    .typeError('nmax must be a number.')
    .required('nmax is required.')
    .integer('nmax must be a whole number.')
    .min(2, 'nmax must be at least 2.')
    .max(NMAX_LIMIT, `nmax can be at most ${NMAX_LIMIT}: the search over two-stage designs is exhaustive, and larger sizes take too long.`),
});
export type DesignSettingsInput = InferType<typeof designSettingsSchema>;

const emptyToNull = (value: unknown, original: unknown) => (original === '' || original === undefined || original === null ? null : value);
const hasSafetyRule = (rule: unknown) => rule === 'toxicity_boundary' || rule === 'bryant_day';
const optionalRate = (label: string) =>
  number().transform(emptyToNull).nullable().typeError(`${label} must be a number.`).moreThan(0, `${label} must be above 0.`).lessThan(1, `${label} must be below 1.`);
const requiredFor = (rule: string, message: string) => (schema: ReturnType<typeof optionalRate>) =>
  schema.when('safetyRule', { is: rule, then: (s) => s.required(message), otherwise: (s) => s.optional() });

/**
 * A cohort's safety rule, locked with its design: the protocol's toxicity definition, and either the
 * continuous toxicity boundary (θ, α; its n is the design's n) or the Bryant–Day design (the
 * toxicity rates and αT; p0, p1, α and β are its response rates, αR and β).
 */
export const safetyRuleFields = {
  safetyRule: string().oneOf(SAFETY_RULES, 'Choose response only, a continuous toxicity boundary or a Bryant–Day design.').default('none'),
  toxMinGrade: toxicityDefinitionFields.toxMinGrade
    .transform(emptyToNull)
    .nullable()
    .when('safetyRule', { is: hasSafetyRule, then: (s) => s.required('Choose the lowest CTCAE grade that counts as a toxicity.'), otherwise: (s) => s.optional() }),
  toxWindowDays: toxicityDefinitionFields.toxWindowDays
    .transform(emptyToNull)
    .nullable()
    .when('safetyRule', { is: hasSafetyRule, then: (s) => s.required('Give the window of days from enrolment in which a toxicity counts.'), otherwise: (s) => s.optional() }),
  toxTheta: requiredFor('toxicity_boundary', 'θ, the acceptable toxicity rate, is required.')(optionalRate('θ')),
  toxAlpha: requiredFor('toxicity_boundary', 'The boundary’s α is required.')(optionalRate('The boundary’s α')),
  toxAcceptable: requiredFor('bryant_day', 'The acceptable toxicity rate is required.')(optionalRate('The acceptable toxicity rate')),
  toxUnacceptable: requiredFor('bryant_day', 'The unacceptable toxicity rate is required.')(optionalRate('The unacceptable toxicity rate')).test(
    'above-acceptable',
    'The unacceptable toxicity rate must be above the acceptable one.',
    function (value) {
      const acceptable = this.parent.toxAcceptable;
      return this.parent.safetyRule !== 'bryant_day' || typeof value !== 'number' || typeof acceptable !== 'number' || value > acceptable;
    },
  ),
  alphaT: requiredFor('bryant_day', 'αT, the toxicity error level, is required.')(optionalRate('αT')),
};

/** The design settings plus what the protocol says about them: the Designs page's form. */
export const designFormSchema = designSettingsSchema.shape({
  ...safetyRuleFields,
  analysisPopulation: string()
    .required('Choose the analysis population.')
    .oneOf(ANALYSIS_POPULATIONS, 'Choose all enrolled or evaluable patients.'),
  interimAccrual: string().required('Choose what happens to accrual at the interim.').oneOf(INTERIM_ACCRUAL, 'Choose pause or continue at risk.'),
  sponsorSeesResponse: boolean().typeError('Say whether sponsors may see response figures.').required('Say whether sponsors may see response figures.'),
  protocolReference: string()
    .trim()
    .required('The protocol reference is required: the signature names it.')
    .max(100, 'The protocol reference can be at most 100 characters.'),
}).test('bryant-day-nmax', `A Bryant–Day search covers nmax up to ${BRYANT_DAY_NMAX_LIMIT}.`, (value, ctx) =>
  value.safetyRule === 'bryant_day' && typeof value.nmax === 'number' && value.nmax > BRYANT_DAY_NMAX_LIMIT
    ? ctx.createError({ path: 'nmax', message: `nmax can be at most ${BRYANT_DAY_NMAX_LIMIT} for a Bryant–Day design: that search is exhaustive, and larger sizes take too long.` })
    : true,
);
export type DesignFormInput = InferType<typeof designFormSchema>;

const lockFields = {
  selection: string()
    .required('Choose a design.')
    .oneOf(SELECTIONS, 'Choose single-stage, optimal, minimax or an admissible design.')
    .test('bryant-day-selection', 'A Bryant–Day design is the optimal or the minimax one.', function (value) {
      return this.parent.safetyRule !== 'bryant_day' || value === 'optimal' || value === 'minimax';
    }),
  admissibleIndex: number()
    .typeError('Choose which admissible design.')
    .integer('Choose which admissible design.')
    .min(0, 'Choose which admissible design.')
    .when('selection', {
      is: 'admissible',
      then: (s) => s.required('Choose which admissible design.'),
      otherwise: (s) => s.optional().nullable(),
    }),
  confirmMeaning: boolean()
    .required('Confirm that you sign with the meaning shown.')
    .oneOf([true], 'Confirm that you sign with the meaning shown.'),
  /** The design version the signer was looking at (0 when none was locked): a stale view gets 409. */
  basedOnVersion: number().integer().min(0).optional(),
};

/** Locking version 1, or a new version before the first enrolment (then with a reason). */
export const designLockSchema = designFormSchema.shape({
  ...lockFields,
  reason: string().trim().max(2000, 'The reason can be at most 2000 characters.').optional().nullable(),
});
export type DesignLockInput = InferType<typeof designLockSchema>;

/** After the first enrolment every change is an amendment, and an amendment always has a reason. */
export const designAmendmentSchema = designFormSchema.shape({
  ...lockFields,
  reason: string()
    .trim()
    .required('An amendment needs a reason.')
    .max(2000, 'The reason can be at most 2000 characters.'),
});

export const cohortTransitionSchema = object({
  to: string().required('Say which status the cohort moves to.').oneOf(COHORT_STATUSES, 'Unknown cohort status.'),
  reason: string()
    .trim()
    .max(2000, 'The reason can be at most 2000 characters.')
    .when('to', { is: 'stopped', then: (s) => s.required('Stopping a cohort needs a reason.'), otherwise: (s) => s.optional().nullable() }),
  stopCategory: string()
    .oneOf(STOP_CATEGORIES, 'Choose futility, efficacy, safety, sponsor decision or other.')
    .when('to', { is: 'stopped', then: (s) => s.required('Choose why the cohort stops.'), otherwise: (s) => s.optional().nullable() }),
  /** The status the caller saw; if the cohort has moved since, the request gets 409. */
  from: string().oneOf(COHORT_STATUSES).optional(),
});
export type CohortTransitionInput = InferType<typeof cohortTransitionSchema>;

export type SignatureKind = 'lock' | 'revision' | 'amendment';

/** The meaning a design signature carries; the server records it and the signing dialog shows it verbatim. */
export function signatureMeaning(input: {
  kind: SignatureKind;
  version: number;
  protocolReference: string;
  trialCode: string;
  cohortCode: string;
}): string {
  const where = `for protocol ${input.protocolReference.trim()} of ${input.trialCode}, cohort ${input.cohortCode}`;
  if (input.kind === 'amendment') return `I approve this amendment (design version ${input.version}) ${where}.`;
  if (input.kind === 'revision') return `I approve version ${input.version} of this design ${where}.`;
  return `I approve this design ${where}.`;
}
