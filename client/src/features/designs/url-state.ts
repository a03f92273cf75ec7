/**
 * The Designs page keeps its state in the page address: the settings compared, the candidates
 * picked for comparison and the candidate being signed. A signature may send the user to the
 * identity provider and back; everything needed to resume is then still in the address (and the
 * reason, which may be long, in sessionStorage).
 */
import { designSettingsSchema } from '../../../../server/designs/designs.schema';
import { safetyDesignSettingsSchema, SAFETY_RULES, type SafetyDesignSettings, type SafetyRule } from '../../../../server/safety/safety.schema';
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
  safetyRule: SafetyRule;
  toxMinGrade: number | '';
  toxWindowDays: number | '';
  toxTheta: number | '';
  toxAlpha: number | '';
  toxAcceptable: number | '';
  toxUnacceptable: number | '';
  alphaT: number | '';
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
  safetyRule: 'none',
  toxMinGrade: 3,
  toxWindowDays: 28,
  toxTheta: 0.25,
  toxAlpha: 0.1,
  toxAcceptable: 0.2,
  toxUnacceptable: 0.4,
  alphaT: 0.1,
};

const NUMBERS = ['p0', 'p1', 'alpha', 'beta', 'nmax'] as const;
/** The safety rule's numbers and their short names in the address. */
const SAFETY_NUMBERS = { toxMinGrade: 'grade', toxWindowDays: 'window', toxTheta: 'theta', toxAlpha: 'talpha', toxAcceptable: 'tacc', toxUnacceptable: 'tunacc', alphaT: 'alphat' } as const;

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
        safetyRule: current.safetyRule,
        toxMinGrade: current.toxicity?.minGrade ?? DEFAULT_VALUES.toxMinGrade,
        toxWindowDays: current.toxicity?.windowDays ?? DEFAULT_VALUES.toxWindowDays,
        toxTheta: current.boundary?.theta ?? DEFAULT_VALUES.toxTheta,
        toxAlpha: current.boundary?.alpha ?? DEFAULT_VALUES.toxAlpha,
        toxAcceptable: current.bryantDay?.toxAcceptable ?? DEFAULT_VALUES.toxAcceptable,
        toxUnacceptable: current.bryantDay?.toxUnacceptable ?? DEFAULT_VALUES.toxUnacceptable,
        alphaT: current.bryantDay?.alphaT ?? DEFAULT_VALUES.alphaT,
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
  const rule = params.get('rule');
  if ((SAFETY_RULES as readonly string[]).includes(rule ?? '')) values.safetyRule = rule as SafetyRule;
  for (const [key, short] of Object.entries(SAFETY_NUMBERS) as Array<[keyof typeof SAFETY_NUMBERS, string]>) {
    if (params.has(short)) values[key] = toNumber(params.get(short));
  }
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
  next.set('rule', values.safetyRule);
  for (const [key, short] of Object.entries(SAFETY_NUMBERS) as Array<[keyof typeof SAFETY_NUMBERS, string]>) next.set(short, String(values[key]));
  return next;
}

/** The response design's settings the candidates were (or are being) computed for, when a comparison was asked for. */
export function comparedSettings(params: URLSearchParams): DesignSettings | null {
  if (params.get('run') !== '1' || params.get('rule') === 'bryant_day') return null;
  const raw = Object.fromEntries(NUMBERS.map((key) => [key, toNumber(params.get(key))]));
  return designSettingsSchema.isValidSync(raw) ? raw : null;
}

/** Whether the form still holds the settings (and safety rule) of the comparison in the address. */
export function sameAsCompared(values: StudioValues, params: URLSearchParams): boolean {
  const now = withValues(new URLSearchParams(), values);
  return [...NUMBERS, 'rule', ...Object.values(SAFETY_NUMBERS)].every((key) => now.get(key) === params.get(key));
}

/** The Bryant–Day search's settings when a comparison of Bryant–Day designs was asked for: p0, p1, α and β are pR0, pR1, αR and β. */
export function comparedSafetySettings(params: URLSearchParams): SafetyDesignSettings | null {
  if (params.get('run') !== '1' || params.get('rule') !== 'bryant_day') return null;
  const number = (key: string) => toNumber(params.get(key));
  const raw = {
    pR0: number('p0'),
    pR1: number('p1'),
    toxAcceptable: number('tacc'),
    toxUnacceptable: number('tunacc'),
    alphaR: number('alpha'),
    alphaT: number('alphat'),
    beta: number('beta'),
    nmax: number('nmax'),
  };
  return safetyDesignSettingsSchema.isValidSync(raw) ? raw : null;
}

/** The continuous boundary's θ and α when a comparison with a toxicity boundary was asked for. */
export function comparedBoundary(params: URLSearchParams): { theta: number; alpha: number } | null {
  if (params.get('run') !== '1' || params.get('rule') !== 'toxicity_boundary') return null;
  const theta = toNumber(params.get('theta'));
  const alpha = toNumber(params.get('talpha'));
  return typeof theta === 'number' && typeof alpha === 'number' && theta > 0 && theta < 1 && alpha > 0 && alpha < 1 ? { theta, alpha } : null;
}

/** The settings a Bryant–Day search ran with, as the design's p0, p1, α, β and nmax. */
export const responseSettingsOf = (s: SafetyDesignSettings): DesignSettings => ({ p0: s.pR0, p1: s.pR1, alpha: s.alphaR, beta: s.beta, nmax: s.nmax });

const reasonKey = (cohortId: string) => `orrery:design-reason:${cohortId}`;

export const pendingReason = {
  read: (cohortId: string) => sessionStorage.getItem(reasonKey(cohortId)) ?? '',
  save: (cohortId: string, reason: string) => sessionStorage.setItem(reasonKey(cohortId), reason),
  clear: (cohortId: string) => sessionStorage.removeItem(reasonKey(cohortId)),
};
