/**
 * What every GET route of the server shows of efficacy, for the permission matrix's per-field
 * check. Each route is listed by what it carries; a new GET route without an entry fails the
 * matrix. The expected views are written out from the visibility rule's table (README, security),
 * not computed by the module under test.
 */
import type { RoleName } from './factories.js';

/**
 * Keys that carry an efficacy figure anywhere in an answer: responders, rates and intervals,
 * tests and p-values, verdicts, responder paths, Bayesian probabilities, the committee's verdict,
 * the projections' released and own-site parts, and safety figures (toxicities, the toxicity rate,
 * the joint response-and-toxicity verdict), which the rule treats as efficacy figures.
 */
export const EFFICACY_KEYS = [
  'responders',
  'stage1Responders',
  'outcomesKnown',
  'rate',
  'responseRate',
  'estimate',
  'ci',
  'pValue',
  'test',
  'exactTest',
  'rule',
  'earlyDetermination',
  'path',
  'posteriorProbability',
  'predictiveProbability',
  'lastRecommendation',
  'released',
  'ownSites',
  'toxicities',
  'toxicityRate',
  'joint',
];

/** The three fixture trials: nothing released, a cut released by a committee decision, a design that lets sponsors see response. */
export type TrialKind = 'unreleased' | 'released' | 'open';
export const TRIAL_KINDS: TrialKind[] = ['unreleased', 'released', 'open'];

type Sees = { live: boolean; released: boolean };
const NOTHING: Sees = { live: false, released: false };
const COMMITTEE: Record<TrialKind, Sees> = { unreleased: { live: true, released: false }, released: { live: true, released: true }, open: { live: true, released: false } };
const AUDIENCE: Record<TrialKind, Sees> = { unreleased: NOTHING, released: { live: false, released: true }, open: { live: true, released: false } };

/** What each demo role sees of a cohort's efficacy on each fixture trial. */
export const SEES: Record<RoleName, Record<TrialKind, Sees>> = {
  statistician: COMMITTEE,
  monitor: COMMITTEE,
  coordinator: AUDIENCE,
  investigator: AUDIENCE,
  sponsor: AUDIENCE,
  admin: { unreleased: NOTHING, released: NOTHING, open: NOTHING },
};

/** Site staff: their own site's live counts beside whatever else they see. */
export const OWN_SITE: Partial<Record<RoleName, string>> = { coordinator: 'SA', investigator: 'SB' };

/** Keys of a projected cohort that carry live efficacy. */
const EVALUATION_LIVE = ['responders', 'stage1', 'stage2', 'rate', 'test', 'rule', 'earlyDetermination', 'accrual', 'notes', 'path'];
const SAFETY_LIVE = ['counts', 'rate', 'state', 'sentences'];
const PORTFOLIO_LIVE = ['responders', 'outcomesKnown', 'responseRate', 'stage1Responders', 'lastRecommendation'];

// Response bodies as supertest hands them over: untyped JSON.
type Body = Record<string, unknown> & { cohorts?: Body[]; portfolio?: { rows: Body[] } };

export type RouteEfficacy =
  /** Efficacy keys may appear only for these roles (none: an operational answer). */
  | { kind: 'efficacy-for'; roles: RoleName[] }
  /** Patient records: site staff read their own site's patients only; the statistician and committee every site. */
  | { kind: 'patient-records' }
  /** A frozen data cut's content: the route admits the statistician and committee members only. */
  | { kind: 'frozen-cut' }
  /** Cohorts projected by the visibility rule. */
  | { kind: 'projected'; cohorts: (body: Body, trialId: string) => Body[]; live: string[]; ownSites: boolean }
  /** The sponsor's weekly digest, as text. */
  | { kind: 'digest' }
  /** The development Outbox. */
  | { kind: 'mailbox' };

const OPERATIONAL: RouteEfficacy = { kind: 'efficacy-for', roles: [] };

export const EFFICACY_ROUTES: Record<string, RouteEfficacy> = {
  'get /api/me': OPERATIONAL,
  'get /api/trials': OPERATIONAL,
  'get /api/trials/:trialId': OPERATIONAL,
  'get /api/sites': OPERATIONAL,
  'get /api/audit/sites': OPERATIONAL,
  'get /api/trials/:trialId/memberships': OPERATIONAL,
  'get /api/trials/:trialId/designs': OPERATIONAL,
  'get /api/trials/:trialId/accrual': OPERATIONAL,
  'get /api/trials/:trialId/patients/import-template.csv': OPERATIONAL,
  'get /api/trials/:trialId/assessments/import-template.csv': OPERATIONAL,
  'get /api/trials/:trialId/audit': { kind: 'efficacy-for', roles: ['statistician'] },
  'get /api/trials/:trialId/patients': { kind: 'patient-records' },
  'get /api/trials/:trialId/patients/export.csv': { kind: 'patient-records' },
  'get /api/trials/:trialId/patients/:patientId': { kind: 'patient-records' },
  'get /api/trials/:trialId/patients/:patientId/history': { kind: 'patient-records' },
  'get /api/trials/:trialId/patients/:patientId/assessments': { kind: 'patient-records' },
  'get /api/trials/:trialId/needs-attention': { kind: 'patient-records' },
  'get /api/trials/:trialId/safety/needs-attention': { kind: 'patient-records' },
  'get /api/trials/:trialId/data-cuts': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/analysis': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/recommendations': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/report.pdf': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/export.csv': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/adrs.csv': { kind: 'frozen-cut' },
  'get /api/data-cuts/:cutId/ae.csv': { kind: 'frozen-cut' },
  'get /api/trials/:trialId/adverse-events': { kind: 'patient-records' },
  'get /api/trials/:trialId/adverse-events/import-template.csv': OPERATIONAL,
  'get /api/trials/:trialId/patients/:patientId/adverse-events': { kind: 'patient-records' },
  'get /api/trials/:trialId/safety': { kind: 'projected', cohorts: (body) => body.cohorts ?? [], live: SAFETY_LIVE, ownSites: false },
  'get /api/trials/:trialId/evaluation': { kind: 'projected', cohorts: (body) => body.cohorts ?? [], live: EVALUATION_LIVE, ownSites: true },
  'get /api/portfolio': { kind: 'projected', cohorts: (body, trialId) => (body.portfolio?.rows ?? []).filter((r) => r.trialId === trialId), live: PORTFOLIO_LIVE, ownSites: false },
  'get /api/dev/digest-preview': { kind: 'digest' },
  'get /api/dev/outbox': { kind: 'mailbox' },
};
