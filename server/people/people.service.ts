/**
 * People & sites: global site records, and who holds which role on a trial. Inviting someone who
 * has never signed in creates a pending membership that activates at their first sign-in; every
 * invitation queues an e-mail in the same transaction. A trial always keeps one active admin.
 * Separation of duties: nobody grants, changes or removes their own membership, and a grant of
 * statistician or committee member is mailed to the trial's statisticians.
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import { enqueueMail } from '../mail/outbox.js';
import { ConflictError, ForbiddenError, InputError, NotFoundError } from '../http/errors.js';
import type { Actor, Role, SessionUser } from '../auth/access.js';
import { ROLE_WORDS } from '../words/index.js';
import { findTrialHeading } from '../trials/index.js';
import { countPatientsAtSite } from '../patients/index.js';
import {
  deleteMembership,
  findMembership,
  findSite,
  findUserByEmail,
  insertMembership,
  insertSite,
  listMemberships,
  listOwnMemberships,
  listSites,
  lockActiveAdmins,
  statisticianEmails,
  trialHasSite,
  updateMembershipRow,
  updateSiteRow,
  type Membership,
  type OwnMembership,
  type Site,
} from './people.repository.js';
import { anyTrialManager, hasTrialManagerGrant, insertTrialManagerGrant } from './trial-managers.repository.js';
import { SITE_MEMBER_ROLES, type MembershipInviteInput, type MembershipUpdateInput, type SiteInput, type SiteUpdateInput } from './people.schema.js';

const siteView = (site: Site) => ({ code: site.code, name: site.name, country: site.country });
const membershipView = (m: Membership) => ({ email: m.email, role: m.role, siteCode: m.siteCode, status: m.status });

const siteCodeTaken = (code: string) =>
  new ConflictError(`A site with code ${code} already exists. Site codes start study IDs, so each must be unique.`, {
    fields: { code: 'This code is already in use.' },
  });

export { listSites };

/** The user's own active memberships (roles come from the database, never the identity provider). */
export async function membershipsOf(db: Db, user: SessionUser): Promise<OwnMembership[]> {
  return listOwnMemberships(db, user.id);
}

/** Whether the user may create sites and trials without managing one yet (the installation's first trial manager). */
export async function isTrialManager(db: Db, user: SessionUser): Promise<boolean> {
  return hasTrialManagerGrant(db, user.id);
}

/** A trial's members, for its admin and statistician. */
export async function memberships(db: Db, actor: Actor): Promise<Membership[]> {
  return listMemberships(db, actor.access.trialId);
}

export async function createSite(db: Db, actor: SessionUser, input: SiteInput): Promise<Site> {
  return db.transaction(async (trx) => {
    const siteId = await insertSite(trx, input);
    if (!siteId) throw siteCodeTaken(input.code);
    const site = (await findSite(trx, siteId)) as Site;
    await writeAudit(trx, { actorUserId: actor.id, entityType: 'site', entityId: siteId, action: 'created', after: siteView(site) });
    return site;
  });
}

export async function updateSite(db: Db, actor: SessionUser, siteId: string, input: SiteUpdateInput): Promise<Site> {
  return db.transaction(async (trx) => {
    const before = await findSite(trx, siteId, { lock: true });
    if (!before) throw new NotFoundError('The site');
    if (before.version !== input.version) {
      throw new ConflictError('Someone else changed this site in the meantime. Review the current record and apply your change again.', {
        current: before,
      });
    }
    // Existing study IDs carry the old prefix; renaming it would split the site's numbering.
    if (input.code !== before.code && (await countPatientsAtSite(trx, siteId)) > 0) {
      throw new ConflictError(`Site ${before.code} has enrolled patients, whose study IDs begin with its code; the code can no longer change.`, {
        fields: { code: 'The code is fixed once patients are enrolled at the site.' },
      });
    }
    if (!(await updateSiteRow(trx, siteId, { code: input.code, name: input.name, country: input.country }))) throw siteCodeTaken(input.code);
    const after = (await findSite(trx, siteId)) as Site;
    await writeAudit(trx, { actorUserId: actor.id, entityType: 'site', entityId: siteId, action: 'updated', before: siteView(before), after: siteView(after) });
    return after;
  });
}

async function checkSiteOnTrial(db: Db, trialId: string, siteId: string | null): Promise<void> {
  if (siteId && !(await trialHasSite(db, trialId, siteId))) {
    throw new InputError('That site does not take part in this trial.', { siteId: 'Choose one of the trial’s sites.' });
  }
}

const alreadyHeld = (email: string, role: Role) =>
  new ConflictError(`${email} already holds the role ${ROLE_WORDS[role]}${SITE_MEMBER_ROLES.includes(role) ? ' at that site' : ''} on this trial.`, {
    fields: { role: 'This person already holds this role here.' },
  });

function invitationMail(input: {
  appOrigin: string;
  trial: { code: string; title: string };
  role: Role;
  siteCode: string | null;
  email: string;
  inviter: string;
  active: boolean;
}) {
  const where = input.siteCode ? ` at site ${input.siteCode}` : '';
  const lines = [
    'Hello,',
    '',
    `${input.inviter} has added you to the trial ${input.trial.code} (${input.trial.title}) in Orrery as ${ROLE_WORDS[input.role]}${where}.`,
    '',
    `Sign in at ${input.appOrigin} with this e-mail address (${input.email}).`,
    input.active ? 'Your access is active now.' : 'Your access becomes active when you first sign in.',
    '',
    `If you did not expect this message, tell ${input.inviter}.`,
  ];
  return { subject: `Orrery: you are invited to ${input.trial.code} as ${ROLE_WORDS[input.role]}`, text: lines.join('\n') };
}

/** Roles whose grant the trial's statisticians hear of: they see unblinded efficacy. */
const UNBLINDED_ROLES: readonly Role[] = ['statistician', 'monitor'];

const isSelf = (actor: SessionUser, membership: { email: string; userId?: string | null }) =>
  membership.userId === actor.id || membership.email.toLowerCase() === actor.email.toLowerCase();

const ownMembership = (what: string) =>
  new ForbiddenError(`Nobody ${what} their own membership or role: ask another trial manager of this trial.`);

/** Tells the trial's statisticians that someone now sees unblinded efficacy, inside the grant's transaction. */
async function mailUnblindedGrant(
  trx: Knex.Transaction,
  input: { trialId: string; membershipId: string; email: string; role: Role; grantedBy: string; event: string },
): Promise<void> {
  if (!UNBLINDED_ROLES.includes(input.role)) return;
  const trial = (await findTrialHeading(trx, input.trialId)) as { code: string; title: string };
  const statisticians = (await statisticianEmails(trx, input.trialId)).filter((email) => email.toLowerCase() !== input.email.toLowerCase());
  await enqueueMail(
    trx,
    statisticians.map((to) => ({
      kind: 'unblinded_role_granted',
      to,
      subject: `${trial.code}: ${input.email} now holds the role ${ROLE_WORDS[input.role]}`,
      text: [
        `${input.grantedBy} ${input.event} ${input.email} on ${trial.code} (${trial.title}) in the role ${ROLE_WORDS[input.role]}.`,
        '',
        "In this role the person sees the trial's efficacy figures across all sites, live and in data cuts.",
        'If this was not agreed, tell the trial manager and review the memberships in Orrery (People & sites).',
      ].join('\n'),
      dedupeKey: `unblinded-grant:${input.membershipId}:${input.role}:${to}`,
    })),
  );
}

export async function inviteMember(db: Db, { user: actor, access }: Actor, input: MembershipInviteInput, appOrigin: string): Promise<Membership> {
  const { trialId } = access;
  if (isSelf(actor, { email: input.email })) throw ownMembership('grants themselves a role or invites');
  return db.transaction(async (trx) => {
    const siteId = input.siteId ?? null;
    await checkSiteOnTrial(trx, trialId, siteId);
    const user = await findUserByEmail(trx, input.email);
    const status = user?.signedInBefore ? 'active' : 'pending';
    const membershipId = await insertMembership(trx, {
      trialId,
      email: input.email,
      role: input.role,
      siteId,
      userId: user?.id ?? null,
      status,
      invitedBy: actor.id,
    });
    if (!membershipId) throw alreadyHeld(input.email, input.role);
    const membership = (await findMembership(trx, trialId, membershipId)) as Membership;
    await writeAudit(trx, { actorUserId: actor.id, trialId, entityType: 'membership', entityId: membershipId, action: 'invited', after: membershipView(membership) });
    const trial = (await findTrialHeading(trx, trialId)) as { code: string; title: string };
    const mail = invitationMail({ appOrigin, trial, role: input.role, siteCode: membership.siteCode, email: input.email, inviter: actor.email, active: status === 'active' });
    await enqueueMail(trx, { kind: 'invitation', to: input.email, ...mail, dedupeKey: `invitation:${membershipId}` });
    await mailUnblindedGrant(trx, { trialId, membershipId, email: input.email, role: input.role, grantedBy: actor.email, event: 'added' });
    return membership;
  });
}

function conflictIfStale(current: Membership, version: number): void {
  if (current.version !== version) {
    throw new ConflictError('Someone else changed this membership in the meantime. Review it and apply your change again.', { current });
  }
}

const lastAdmin = () =>
  new ConflictError('This is the trial’s last active admin. Make someone else admin first, so the trial keeps a manager.');

export async function updateMember(db: Db, { user: actor, access }: Actor, membershipId: string, input: MembershipUpdateInput): Promise<Membership> {
  const { trialId } = access;
  return db.transaction(async (trx) => {
    const admins = await lockActiveAdmins(trx, trialId);
    const before = await findMembership(trx, trialId, membershipId, { lock: true });
    if (!before) throw new NotFoundError('The membership');
    if (isSelf(actor, before)) throw ownMembership('changes');
    conflictIfStale(before, input.version);
    const siteId = input.siteId ?? null;
    await checkSiteOnTrial(trx, trialId, siteId);
    if (before.role === 'admin' && input.role !== 'admin' && admins.length === 1 && admins[0] === membershipId) throw lastAdmin();
    if (!(await updateMembershipRow(trx, membershipId, { role: input.role, siteId }))) throw alreadyHeld(before.email, input.role);
    const after = (await findMembership(trx, trialId, membershipId)) as Membership;
    await writeAudit(trx, {
      actorUserId: actor.id,
      trialId,
      entityType: 'membership',
      entityId: membershipId,
      action: 'updated',
      before: membershipView(before),
      after: membershipView(after),
    });
    if (after.role !== before.role) {
      await mailUnblindedGrant(trx, { trialId, membershipId, email: after.email, role: after.role, grantedBy: actor.email, event: 'made' });
    }
    return after;
  });
}

export async function removeMember(db: Db, { user: actor, access }: Actor, membershipId: string): Promise<void> {
  const { trialId } = access;
  await db.transaction(async (trx) => {
    const admins = await lockActiveAdmins(trx, trialId);
    const before = await findMembership(trx, trialId, membershipId, { lock: true });
    if (!before) throw new NotFoundError('The membership');
    if (isSelf(actor, before)) throw ownMembership('removes');
    if (admins.length === 1 && admins[0] === membershipId) throw lastAdmin();
    await deleteMembership(trx, membershipId);
    await writeAudit(trx, { actorUserId: actor.id, trialId, entityType: 'membership', entityId: membershipId, action: 'removed', before: membershipView(before) });
  });
}

/**
 * Makes someone the first trial manager of an empty installation (run from the command line by
 * whoever operates it, audited): they may then create sites and trials and invite everyone else
 * in the application. Refused once anyone manages trials, so the command cannot grant twice.
 */
export async function grantFirstManager(db: Db, email: string, grantedFrom: string): Promise<{ id: string; active: boolean }> {
  const address = email.trim().toLowerCase();
  if (!/^[^@\s]+@[^@\s]+\.[^@\s]+$/.test(address)) throw new InputError(`"${email}" is not an e-mail address.`, { email: 'Give an e-mail address.' });
  return db.transaction(async (trx) => {
    // One grant at a time, even from two consoles at once.
    await trx.raw('lock table trial_manager_grants in share row exclusive mode');
    if (await anyTrialManager(trx)) {
      throw new ConflictError('Someone already manages trials on this installation: they invite further trial managers in Orrery (People & sites).');
    }
    const user = await findUserByEmail(trx, address);
    const id = await insertTrialManagerGrant(trx, { email: address, userId: user?.id ?? null, grantedFrom });
    await writeAudit(trx, { actorUserId: null, entityType: 'trial_manager_grant', entityId: id, action: 'granted', after: { email: address, grantedFrom }, reason: 'First trial manager of an empty installation' });
    return { id, active: Boolean(user) };
  });
}
