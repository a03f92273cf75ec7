/**
 * The Designs page keeps its state in the page address: the settings compared, the candidates
 * picked for comparison and the candidate being signed. A signature may send the user to the
 * identity provider and back; everything needed to resume is then still in the address (and the
 * reason, which may be long, in sessionStorage).
 */
import { designSettingsSchema } from '../../../../server/designs/designs.schema';
import type { DesignSettings, DesignVersion } from './types';

export type StudioValues = {
  p0: number | '';
  p1: number | '';
  alpha: number | '';
  beta: number | '';
  nmax: number | '';
  analysisPopulation: 'all_enrolled' | 'evaluable';
  interimAccrual: 'pause' | 'continue_at_risk';
  sponsorSeesResponse: boolean;
  protocolReference: string;
};

export const DEFAULT_VALUES: StudioValues = {
  p0: 0.2,
  p1: 0.4,
  alpha: 0.05,
  beta: 0.2,
  nmax: 60,
  analysisPopulation: 'all_enrolled',
  interimAccrual: 'pause',
  sponsorSeesResponse: false,
  protocolReference: '',
};

const NUMBERS = ['p0', 'p1', 'alpha', 'beta', 'nmax'] as const;

const toNumber = (raw: string | null): number | '' => (raw === null || raw.trim() === '' || Number.isNaN(Number(raw)) ? '' : Number(raw));

/** The form's starting values: from the address when it holds them, else from the design in force, else defaults. */
export function initialValues(params: URLSearchParams, current: DesignVersion | undefined): StudioValues {
  const base: StudioValues = current
    ? {
        p0: current.p0,
        p1: current.p1,
        alpha: current.alpha,
        beta: current.beta,
        nmax: current.nmax ?? DEFAULT_VALUES.nmax,
        analysisPopulation: current.analysisPopulation,
        interimAccrual: current.interimAccrual,
        sponsorSeesResponse: current.sponsorSeesResponse,
        protocolReference: current.protocolReference ?? '',
      }
    : DEFAULT_VALUES;
  if (!params.has('p0')) return base;
  const values = { ...base };
  for (const key of NUMBERS) values[key] = toNumber(params.get(key));
  const pop = params.get('pop');
  if (pop === 'all_enrolled' || pop === 'evaluable') values.analysisPopulation = pop;
  const interim = params.get('interim');
  if (interim === 'pause' || interim === 'continue_at_risk') values.interimAccrual = interim;
  if (params.has('sponsor')) values.sponsorSeesResponse = params.get('sponsor') === '1';
  if (params.has('ref')) values.protocolReference = params.get('ref') ?? '';
  return values;
}

/** A copy of the address's parameters with the form's values written in. */
export function withValues(params: URLSearchParams, values: StudioValues): URLSearchParams {
  const next = new URLSearchParams(params);
  for (const key of NUMBERS) next.set(key, String(values[key]));
  next.set('pop', values.analysisPopulation);
  next.set('interim', values.interimAccrual);
  next.set('sponsor', values.sponsorSeesResponse ? '1' : '0');
  next.set('ref', values.protocolReference);
  return next;
}

/** The settings the candidates were (or are being) computed for, when a comparison was asked for. */
export function comparedSettings(params: URLSearchParams): DesignSettings | null {
  if (params.get('run') !== '1') return null;
  const raw = Object.fromEntries(NUMBERS.map((key) => [key, toNumber(params.get(key))]));
  return designSettingsSchema.isValidSync(raw) ? (raw) : null;
}

const reasonKey = (cohortId: string) => `orrery:design-reason:${cohortId}`;

export const pendingReason = {
  read: (cohortId: string) => sessionStorage.getItem(reasonKey(cohortId)) ?? '',
  save: (cohortId: string, reason: string) => sessionStorage.setItem(reasonKey(cohortId), reason),
  clear: (cohortId: string) => sessionStorage.removeItem(reasonKey(cohortId)),
};
