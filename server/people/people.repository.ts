/**
 * The people store: sites, a trial's memberships and the users behind them, as plain domain
 * objects. The only module that reads or writes the sites and memberships tables (sign-in
 * provisions users in auth/users.repository.ts).
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import type { Role } from '../auth/access.js';

export type Site = {
  id: string;
  code: string;
  name: string;
  country: string;
  version: number;
  /** How many trials the site takes part in. */
  trialCount: number;
  updatedAt: string;
};

export type Membership = {
  id: string;
  trialId: string;
  email: string;
  role: Role;
  status: 'pending' | 'active';
  siteId: string | null;
  siteCode: string | null;
  userId: string | null;
  name: string | null;
  version: number;
  createdAt: string;
};

type SiteRow = { id: string; code: string; name: string; country: string; version: number; trial_count: number; updated_at: Date };

const toSite = (row: SiteRow): Site => ({
  id: row.id,
  code: row.code,
  name: row.name,
  country: row.country,
  version: row.version,
  trialCount: row.trial_count,
  updatedAt: row.updated_at.toISOString(),
});

const isUniqueViolation = (error: unknown) => (error as { code?: string })?.code === '23505';

const sitesQuery = (db: Db) =>
  db('sites as s').select('s.*', db.raw('(select count(*) from trial_sites ts where ts.site_id = s.id)::int as trial_count'));

export async function listSites(db: Db): Promise<Site[]> {
  return (await sitesQuery(db).orderBy('s.code')).map(toSite);
}

export async function findSite(db: Db, siteId: string, options: { lock?: boolean } = {}): Promise<Site | undefined> {
  const query = sitesQuery(db).where('s.id', siteId).first();
  const row: SiteRow | undefined = await (options.lock ? query.forUpdate('s') : query);
  return row && toSite(row);
}

/** Inserts a site; undefined when the code is taken. */
export async function insertSite(db: Db, site: { code: string; name: string; country: string }): Promise<string | undefined> {
  try {
    const [row] = await db('sites').insert(site).returning('id');
    return row.id;
  } catch (error) {
    if (isUniqueViolation(error)) return undefined;
    throw error;
  }
}

/** Updates a site and bumps its version; false when the new code is taken. */
export async function updateSiteRow(db: Db, siteId: string, site: { code: string; name: string; country: string }): Promise<boolean> {
  try {
    await db('sites')
      .where({ id: siteId })
      .update({ ...site, version: db.raw('version + 1'), updated_at: db.fn.now() });
    return true;
  } catch (error) {
    if (isUniqueViolation(error)) return false;
    throw error;
  }
}

const membershipsQuery = (db: Db) =>
  db('memberships as m')
    .leftJoin('sites as s', 's.id', 'm.site_id')
    .leftJoin('users as u', 'u.id', 'm.user_id')
    .select(
      'm.id',
      'm.trial_id as trialId',
      'm.email',
      'm.role',
      'm.status',
      'm.site_id as siteId',
      's.code as siteCode',
      'm.user_id as userId',
      'u.name',
      'm.version',
      'm.created_at as createdAt',
    );

export async function listMemberships(db: Db, trialId: string): Promise<Membership[]> {
  const rows = await membershipsQuery(db)
    .where('m.trial_id', trialId)
    .orderBy([{ column: 'm.role' }, { column: 'm.email' }]);
  return rows.map((row: Membership & { createdAt: Date }) => ({ ...row, createdAt: row.createdAt.toISOString() }));
}

export async function findMembership(db: Db, trialId: string, membershipId: string, options: { lock?: boolean } = {}): Promise<Membership | undefined> {
  const query = membershipsQuery(db).where({ 'm.trial_id': trialId, 'm.id': membershipId }).first();
  const row: (Membership & { createdAt: Date }) | undefined = await (options.lock ? query.forUpdate('m') : query);
  return row && { ...row, createdAt: row.createdAt.toISOString() };
}

/** The user with this e-mail, if one exists, and whether they have ever signed in. */
export async function findUserByEmail(db: Db, email: string): Promise<{ id: string; signedInBefore: boolean } | undefined> {
  const row = await db('users').whereRaw('lower(email) = ?', [email.toLowerCase()]).first('id', 'last_sign_in_at');
  return row && { id: row.id, signedInBefore: row.last_sign_in_at !== null };
}

export async function trialHasSite(db: Db, trialId: string, siteId: string): Promise<boolean> {
  return !!(await db('trial_sites').where({ trial_id: trialId, site_id: siteId }).first('site_id'));
}

/** Locks the trial's active admin memberships so two concurrent removals cannot leave none. */
export async function lockActiveAdmins(db: Db, trialId: string): Promise<string[]> {
  const rows: Array<{ id: string }> = await db('memberships')
    .where({ trial_id: trialId, role: 'admin', status: 'active' })
    .forUpdate()
    .select('id');
  return rows.map((r) => r.id);
}

/** Inserts a membership; undefined when the person already holds that role (at that site). */
export async function insertMembership(
  db: Db,
  membership: { trialId: string; email: string; role: Role; siteId: string | null; userId: string | null; status: 'pending' | 'active'; invitedBy: string },
): Promise<string | undefined> {
  try {
    const [row] = await db('memberships')
      .insert({
        trial_id: membership.trialId,
        email: membership.email,
        role: membership.role,
        site_id: membership.siteId,
        user_id: membership.userId,
        status: membership.status,
        invited_by: membership.invitedBy,
      })
      .returning('id');
    return row.id;
  } catch (error) {
    if (isUniqueViolation(error)) return undefined;
    throw error;
  }
}

/** Changes role and site and bumps the version; false when that role (at that site) is already held. */
export async function updateMembershipRow(db: Db, membershipId: string, change: { role: Role; siteId: string | null }): Promise<boolean> {
  try {
    await db('memberships')
      .where({ id: membershipId })
      .update({ role: change.role, site_id: change.siteId, version: db.raw('version + 1'), updated_at: db.fn.now() });
    return true;
  } catch (error) {
    if (isUniqueViolation(error)) return false;
    throw error;
  }
}

export async function deleteMembership(db: Db, membershipId: string): Promise<void> {
  await db('memberships').where({ id: membershipId }).delete();
}

/** E-mail addresses of the trial's active members in the given roles. */
export async function memberEmails(db: Db, trialId: string, roles: readonly Role[]): Promise<string[]> {
  const rows: Array<{ email: string }> = await db('memberships')
    .where({ trial_id: trialId, status: 'active' })
    .whereIn('role', roles as Role[])
    .distinct(db.raw('lower(email) as email'));
  return rows.map((r) => r.email).sort();
}

/** Whether the user holds the role at the site on the trial (an investigator attesting their own site's outcome). */
export async function holdsRoleAtSite(db: Db, input: { trialId: string; userId: string; role: Role; siteId: string }): Promise<boolean> {
  const row = await db('memberships')
    .where({ trial_id: input.trialId, user_id: input.userId, role: input.role, site_id: input.siteId, status: 'active' })
    .first('id');
  return !!row;
}

/** Committee members of the trial: how many could sign. */
export async function countMonitors(db: Db, trialId: string): Promise<number> {
  const row = await db('memberships').where({ trial_id: trialId, role: 'monitor', status: 'active' }).countDistinct({ n: 'user_id' }).first();
  return Number(row?.n ?? 0);
}

/** The trial's people who hear about an applied decision: site staff and sponsors. */
export async function decisionRecipients(db: Db, trialId: string): Promise<Array<{ email: string; role: string }>> {
  return db('memberships')
    .where({ trial_id: trialId, status: 'active' })
    .whereIn('role', ['coordinator', 'investigator', 'sponsor'])
    .distinct('email', 'role')
    .orderBy(['email', 'role']);
}

export async function statisticianEmails(db: Db, trialId: string): Promise<string[]> {
  const rows: Array<{ email: string }> = await db('memberships').where({ trial_id: trialId, role: 'statistician', status: 'active' }).distinct('email');
  return rows.map((row) => row.email);
}

/** How a user is named to others: their name, else their e-mail address. */
export async function findUserName(db: Db, userId: string): Promise<string | null> {
  const row = await db('users').where({ id: userId }).first('name', 'email');
  return row?.name ?? row?.email ?? null;
}

export type SponsorRecipient = { userId: string; email: string; name: string | null; trialIds: string[] };

/** Everyone holding an active sponsor membership, with the trials they sponsor. */
export async function sponsorRecipients(db: Db): Promise<SponsorRecipient[]> {
  const rows = await db('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.role': 'sponsor', 'm.status': 'active' })
    .groupBy('u.id', 'u.email', 'u.name')
    .orderBy('u.email')
    .select('u.id', 'u.email', 'u.name', db.raw('array_agg(distinct m.trial_id) as trial_ids'));
  return rows.map((row: { id: string; email: string; name: string | null; trial_ids: string[] }) => ({
    userId: row.id,
    email: row.email,
    name: row.name,
    trialIds: row.trial_ids,
  }));
}

export type OwnMembership = { id: string; trialId: string; trialCode: string; role: Role; siteId: string | null; siteCode: string | null };

/** The user's own active memberships, trial by trial. */
export async function listOwnMemberships(db: Db, userId: string): Promise<OwnMembership[]> {
  const [row] = await db.select({ memberships: ownMembershipsJson(db, userId) });
  return row.memberships as OwnMembership[];
}

/** The user's active memberships as one JSON array (trial code, then role), for a read that gathers several things in one statement. */
export function ownMembershipsJson(db: Db, userId: string): Knex.Raw {
  const rows = db('memberships as m')
    .join('trials as t', 't.id', 'm.trial_id')
    .leftJoin('sites as s', 's.id', 'm.site_id')
    .where({ 'm.user_id': userId, 'm.status': 'active' })
    .select('m.id', 'm.trial_id as trialId', 't.code as trialCode', 'm.role', 'm.site_id as siteId', 's.code as siteCode');
  return db.raw(`(select coalesce(json_agg(q order by q."trialCode", q.role), '[]'::json) from (?) q)`, [rows]);
}
