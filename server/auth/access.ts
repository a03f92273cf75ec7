/**
 * The domain's words for who may do what: roles, a user's access to one trial, and the actor a
 * service acts for. Pure and free of Express, so services, stores, shared schemas and the client
 * import it alike; `server/http/` only mounts routes and authorises against it.
 */
export const ROLES = ['admin', 'statistician', 'coordinator', 'investigator', 'monitor', 'sponsor'] as const;
export type Role = (typeof ROLES)[number];

/** Roles held at a site: they see and write their own sites' patients only. */
export const SITE_ROLES: readonly Role[] = ['coordinator', 'investigator'];

export type SessionUser = { id: string; email: string; name: string | null };

/** What the signed-in user may do on one trial. */
export type TrialAccess = {
  trialId: string;
  roles: Role[];
  /** Sites the user holds a site role at; irrelevant for roles that read every site. */
  siteIds: string[];
  /** The trial's data version (server/db/trial-versions.ts), read in the same statement as the membership, when it was. */
  dataVersion?: number;
};

/** Who a service acts for: the signed-in user and their access to the trial concerned. */
export type Actor = { user: SessionUser; access: TrialAccess };

export const isUuid = (value: unknown): value is string =>
  typeof value === 'string' && /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);

export function hasRole(access: TrialAccess | undefined, ...roles: Role[]): boolean {
  return !!access && access.roles.some((role) => roles.includes(role));
}

export const hasAnyRole = (mine: readonly string[] | undefined, allowed: readonly Role[]) =>
  !!mine && mine.some((role) => (allowed as readonly string[]).includes(role));

/** Roles that read every site's patient records: the statistician and committee members (the rule: server/auth/visibility.ts). */
export const ALL_SITES_ROLES: readonly Role[] = ['statistician', 'monitor'];

/**
 * Sites whose patient records the user reads: every site for the statistician and committee
 * members, their own for site staff, none for anyone else — whatever other roles they hold.
 */
export function siteScope(access: Pick<TrialAccess, 'roles' | 'siteIds'>): string[] | 'all' {
  return hasAnyRole(access.roles, ALL_SITES_ROLES) ? 'all' : access.siteIds;
}

/** Patient data is written by the site roles at their own sites only, whatever other roles they hold. */
export const writableSites = (access: TrialAccess): string[] => access.siteIds;
