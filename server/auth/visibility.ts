/**
 * Who may see efficacy figures — the one rule, applied by every route, job, mail, export and page.
 *
 * Efficacy figures are responders, response rates, intervals, p-values, rule verdicts that reveal
 * counts, responder paths, Bayesian probabilities, and any mail or export carrying them. Safety
 * figures — toxicities, toxicity rates and their intervals, where a cohort stands against its
 * toxicity boundary or Bryant–Day limit, joint response-and-toxicity verdicts — are efficacy
 * figures under this rule: the same table, the same functions (`efficacyView`, `projectEfficacy`,
 * `recipientRoles('live-efficacy', …)`). Adverse-event records are patient records. Operational
 * figures (enrolment, pending outcomes, data issues, a cohort's status and whether its accrual is
 * paused for a safety review) are every member's.
 *
 * | role on the trial                       | live, trial-wide         | frozen data cuts | released cut (frozen, dated) | own sites' live counts | patient records |
 * |-----------------------------------------|--------------------------|------------------|------------------------------|------------------------|-----------------|
 * | statistician, committee member (monitor) | yes                      | every cut        | yes                          | —  (they see all)      | every site      |
 * | coordinator, investigator               | only where the design lets sponsors see response | no | yes                  | yes                    | own sites       |
 * | trial manager (admin)                   | no                       | no               | no                           | no                     | none            |
 * | sponsor, and any other role             | only where the design lets sponsors see response | no | yes                  | no                     | none            |
 *
 * A user with several roles on a trial gets the union. "Released" means a committee decision was
 * applied on a data cut of the cohort: its figures are the ones `analyseCut` computed on that cut,
 * kept at release and labelled with the cut's date; recording outcomes afterwards never moves them.
 *
 * Compute everything, then project: features compute their full payload and hand it to
 * `projectEfficacy` with the keys that carry live efficacy; hidden keys are absent (not null), and
 * `efficacyHidden` says why in a sentence from the words module. Mail picks its recipients with
 * `recipientRoles`; the development Outbox filters with `seesEveryMessage` / `addressedTo`.
 * Pure: no database, no Express.
 */
import { ALL_SITES_ROLES, ROLES, SITE_ROLES, hasAnyRole, siteScope, type Role, type TrialAccess } from './access.js';
import { liveFiguresHidden, releasedAsOf, type HiddenAudience, type HiddenFigures } from '../words/index.js';

/**
 * Roles that read efficacy live and every frozen data cut (its analysis, report and exports), across
 * all sites: the statistician and committee members, the same people who read every site's records.
 */
export const LIVE_EFFICACY_ROLES: readonly Role[] = ALL_SITES_ROLES;

/** Roles that see operational figures only, whatever is released. */
const OPERATIONAL_ROLES: readonly Role[] = ['admin'];

/** Roles that see a released cut's figures, and live figures where the locked design lets sponsors see response. */
export const RELEASE_AUDIENCE: readonly Role[] = ROLES.filter((role) => !OPERATIONAL_ROLES.includes(role));

/** What the rule needs to know of a cohort. */
export type CohortRelease = {
  /** The locked design lets sponsors see response figures live. */
  sponsorSeesResponse: boolean;
  /** A committee decision released a data cut of this cohort. */
  released: boolean;
};

/** What one viewer may see of one cohort's efficacy. */
export type EfficacyView = {
  /** Live, trial-wide efficacy figures. */
  live: boolean;
  /** The released cut's frozen figures. */
  released: boolean;
  /** Sites whose live counts the viewer may see (the sites they hold a site role at). */
  ownSiteIds: readonly string[];
  /** Why live figures are absent, in a sentence; only when they are. */
  hiddenReason?: string;
};

function hiddenAudience(roles: readonly Role[]): HiddenAudience {
  if (hasAnyRole(roles, SITE_ROLES)) return 'site';
  return hasAnyRole(roles, RELEASE_AUDIENCE) ? 'sponsor' : 'operational';
}

/** The rule for one viewer (their roles and sites on the trial) and one cohort; `figures` names what a hidden reason speaks of. */
export function efficacyView(access: Pick<TrialAccess, 'roles' | 'siteIds'>, cohort: CohortRelease, figures: HiddenFigures = 'response'): EfficacyView {
  const { roles } = access;
  const committee = hasAnyRole(roles, LIVE_EFFICACY_ROLES);
  const audience = hasAnyRole(roles, RELEASE_AUDIENCE);
  const live = committee || (audience && cohort.sponsorSeesResponse);
  const released = audience && cohort.released;
  const ownSiteIds = hasAnyRole(roles, SITE_ROLES) ? access.siteIds : [];
  return live ? { live, released, ownSiteIds } : { live, released, ownSiteIds, hiddenReason: liveFiguresHidden(hiddenAudience(roles), released, figures) };
}

/** Who reads frozen data cuts — their analysis, report and exports. */
export const FROZEN_CUT_READERS = LIVE_EFFICACY_ROLES;

/**
 * Sites whose patient records (and patient-level audit history) the viewer reads: every site for
 * the statistician and committee members, their own for site staff, none otherwise.
 */
export const patientRecordSites = siteScope;

/** Sites whose operational rows (enrolment, pending outcomes) the viewer reads: site staff their own, every other role all. */
export function operationalSites(access: Pick<TrialAccess, 'roles' | 'siteIds'>): string[] | 'all' {
  return access.roles.some((role) => !SITE_ROLES.includes(role)) ? 'all' : access.siteIds;
}

/** A computed payload as one viewer may see it (see `projectEfficacy`). */
export type Projected<T, K extends keyof T, R = never, S = never> = Omit<T, K> &
  Partial<Pick<T, K>> & {
    /** Why live efficacy figures are absent; only when they are. */
    efficacyHidden?: string;
    /** The released cut's frozen figures with their date label; only when the viewer may see them and a cut is released. */
    released?: R & { label: string };
    /** Live counts at the viewer's own sites; only for site staff. */
    ownSites?: S[];
  };

/** The payload with the given keys left out: absent, not null. */
export function omitKeys<T extends object, K extends keyof T>(payload: T, keys: readonly K[]): Omit<T, K> {
  const copy = { ...payload };
  for (const key of keys) delete copy[key];
  return copy;
}

/**
 * Strips a computed payload to what the viewer may see: the `liveKeys` only where live figures
 * are allowed (else absent, with `efficacyHidden` saying why); the released cut's figures, labelled
 * with the cut's date, only where allowed; per-site counts only for the viewer's own sites.
 */
export function projectEfficacy<T extends object, K extends keyof T, R extends { cutAt: string } = never, S extends { siteId: string } = never>(
  view: EfficacyView,
  computed: T,
  liveKeys: readonly K[],
  extras: { released?: R | null; sites?: readonly S[] } = {},
): Projected<T, K, R, S> {
  // Omit<T, K> is a Partial<Pick<T, K>> with those keys absent, which the compiler cannot see for a generic T.
  const projected = (view.live ? { ...computed } : { ...omitKeys(computed, liveKeys), efficacyHidden: view.hiddenReason }) as Projected<T, K, R, S>;
  if (view.released && extras.released) projected.released = { ...extras.released, label: releasedAsOf(extras.released.cutAt) };
  if (view.ownSiteIds.length > 0 && extras.sites) projected.ownSites = extras.sites.filter((site) => view.ownSiteIds.includes(site.siteId));
  return projected;
}

/** What a message carries, for choosing who may receive it. */
export type MailContent = 'live-efficacy' | 'released-efficacy' | 'operational';

const MAIL_AUDIENCE: Record<MailContent, readonly Role[]> = {
  'live-efficacy': LIVE_EFFICACY_ROLES,
  'released-efficacy': RELEASE_AUDIENCE,
  operational: ROLES,
};

/**
 * The roles, among those a message is meant for, whose holders may receive its content. A message
 * with content for several audiences is split: one message per content, each to its own roles.
 */
export function recipientRoles(content: MailContent, intended: readonly Role[]): Role[] {
  return intended.filter((role) => MAIL_AUDIENCE[content].includes(role));
}

/** The development Outbox shows every message to trial managers (admin on any trial), to everyone else their own. */
export const seesEveryMessage = (rolesAnywhere: readonly Role[]) => hasAnyRole(rolesAnywhere, OPERATIONAL_ROLES);

/** Whether a message with these recipients is addressed to this e-mail address. */
export const addressedTo = (recipients: readonly string[], email: string) => recipients.some((to) => to.toLowerCase() === email.toLowerCase());
