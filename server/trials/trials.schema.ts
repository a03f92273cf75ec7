/**
 * Yup schemas for setting up a trial: the trial record, its cohorts and sites, and the
 * statistician's protocol settings for outcomes; and the codes of a cohort's life that other
 * payloads name. Shared by the routes and the client's forms, so this file imports nothing but Yup.
 */
import * as yup from 'yup';

/** A cohort's life: draft → enrolling stage 1 → interim review → enrolling stage 2 → final analysis → completed, or stopped. */
export const COHORT_STATUSES = ['draft', 'enrolling_stage_1', 'interim_review', 'enrolling_stage_2', 'final_analysis', 'completed', 'stopped'] as const;
export type CohortStatus = (typeof COHORT_STATUSES)[number];

/** Why a cohort stopped. */
export const STOP_CATEGORIES = ['futility', 'efficacy', 'safety', 'sponsor', 'other'] as const;
export type StopCategory = (typeof STOP_CATEGORIES)[number];

/** Empty form inputs arrive as '' — treat them as "not given". */
const emptyToNull = (value: unknown, original: unknown) => (original === '' || original === undefined ? null : value);

const isRealDate = (value: string) => {
  const date = new Date(`${value}T00:00:00Z`);
  return !Number.isNaN(date.getTime()) && date.toISOString().slice(0, 10) === value;
};

export const isoDate = () =>
  yup
    .string()
    .matches(/^\d{4}-\d{2}-\d{2}$/, 'Use a date (YYYY-MM-DD).')
    .test('real-date', 'This is not a calendar date.', (value) => !value || isRealDate(value));

const accrual = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a number.`)
    .transform(emptyToNull)
    .integer(`${label} must be a whole number.`)
    .min(0, `${label} cannot be negative.`)
    .max(1000, `${label} is at most 1000 patients a month.`)
    .nullable()
    .default(null);

export const TRIAL_CODE = /^[A-Z0-9][A-Z0-9-]{1,19}$/;
export const COHORT_CODE = /^[A-Z0-9][A-Z0-9-]{0,11}$/;
export const DEFAULT_COHORT = { code: 'MAIN', name: 'All patients' } as const;

export const cohortSchema = yup.object({
  code: yup
    .string()
    .trim()
    .required('Give the cohort a short code.')
    .matches(COHORT_CODE, 'Capital letters, digits and hyphens, up to 12 characters (e.g. NSCLC).'),
  name: yup.string().trim().required('Name the cohort.').max(120, 'At most 120 characters.'),
});

export const trialSiteSchema = yup.object({
  siteId: yup.string().required('Choose a site.').uuid('Choose a site from the list.'),
  plannedAccrualPerMonth: accrual('Planned accrual at the site'),
});

const trialFields = {
  code: yup
    .string()
    .trim()
    .required('Give the trial its protocol code.')
    .matches(TRIAL_CODE, 'Capital letters, digits and hyphens, 2 to 20 characters (e.g. TSY-206).'),
  title: yup.string().trim().required('Give the trial a title.').max(200, 'At most 200 characters.'),
  indication: yup.string().trim().required('Name the indication.').max(200, 'At most 200 characters.'),
  endpointDefinition: yup
    .string()
    .trim()
    .required('Define the endpoint (e.g. objective response by RECIST 1.1).')
    .max(2000, 'At most 2000 characters.'),
  sponsorName: yup
    .string()
    .trim()
    .max(200, 'At most 200 characters.')
    .transform((value: string) => (value === '' ? null : value))
    .nullable()
    .default(null),
  plannedAccrualPerMonth: accrual('Planned accrual'),
  startDate: isoDate().transform(emptyToNull).nullable().default(null),
  sites: yup
    .array()
    .of(trialSiteSchema.required())
    .max(200, 'At most 200 sites.')
    .default([])
    .test('unique-sites', 'Each site can be listed once.', (sites) => !sites || new Set(sites.map((s) => s.siteId)).size === sites.length),
};

export const trialCreateSchema = yup.object({
  ...trialFields,
  cohorts: yup
    .array()
    .of(cohortSchema.required())
    .max(20, 'At most 20 cohorts.')
    .default([])
    .test('unique-cohorts', 'Each cohort code can be used once.', (cohorts) => !cohorts || new Set(cohorts.map((c) => c.code)).size === cohorts.length),
});
export type TrialCreateInput = yup.InferType<typeof trialCreateSchema>;

const version = yup.number().typeError('The record version is missing.').required('The record version is missing.').integer().min(1);

export const trialUpdateSchema = yup.object({ ...trialFields, version });
export type TrialUpdateInput = yup.InferType<typeof trialUpdateSchema>;

export const cohortUpdateSchema = cohortSchema.shape({ version });
export type CohortInput = yup.InferType<typeof cohortSchema>;
export type CohortUpdateInput = yup.InferType<typeof cohortUpdateSchema>;

export const OUTCOME_SOURCES = ['entered', 'derived'] as const;
export const NE_BETWEEN_RESPONSES = ['ignore', 'breaks_confirmation'] as const;

const days = (label: string, min: number, max: number) =>
  yup
    .number()
    .typeError(`${label} must be a number.`)
    .required(`${label} is required.`)
    .integer(`${label} must be a whole number.`)
    .min(min, `${label} is at least ${min}.`)
    .max(max, `${label} is at most ${max}.`);

/** The RECIST 1.1 rules a trial's protocol sets for outcomes (statistician only). */
export const protocolSettingsSchema = yup.object({
  outcomeSource: yup.string().required().oneOf(OUTCOME_SOURCES, 'Choose entered or derived.'),
  confirmationRequired: yup.boolean().required(),
  confirmationMinDays: days('Days to confirmation', 1, 365),
  sdMinDays: days('Minimum days for stable disease', 1, 365),
  neBetweenResponses: yup.string().required().oneOf(NE_BETWEEN_RESPONSES, 'Choose how an NE between responses counts.'),
  assessmentIntervalDays: days('Assessment interval', 1, 365),
  inactivityWarningWeeks: days('Weeks before an inactivity warning', 1, 104),
  /** Required by the server once patients are enrolled: the change then alters how outcomes count. */
  reason: yup
    .string()
    .trim()
    .max(1000, 'At most 1000 characters.')
    .transform((value: string) => (value === '' ? null : value))
    .nullable()
    .default(null),
  version,
});
export type ProtocolSettingsInput = yup.InferType<typeof protocolSettingsSchema>;
