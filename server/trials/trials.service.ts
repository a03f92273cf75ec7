/**
 * Setting up a trial: the admin creates it (with its cohorts and sites) and edits it; cohorts are
 * added or renamed while the trial is still a draft; the statistician sets the protocol's rules
 * for outcomes. Each change is one transaction with its audit row; edits are version-locked.
 */
import type { Db, FirstRead } from '../db/knex.js';
import type { Actor, Role, SessionUser } from '../auth/access.js';
import { writeAudit } from '../audit/audit.js';
import { emit, type Hooks } from '../hooks.js';
import { ConflictError, InputError, NotFoundError } from '../http/errors.js';
import { countPatientsInTrial } from '../patients/index.js';
import { insertMembership } from '../people/index.js';
import {
  existingSiteIds,
  findCohort,
  findTrialDetail,
  insertCohorts,
  insertTrial,
  setTrialSites,
  sitesInUse,
  updateCohortRow,
  updateProtocolSettingsRow,
  updateTrialRow,
  type Cohort,
  type TrialDetail,
  type TrialFields,
  type TrialForUser,
} from './trials.repository.js';
import { listTrialsForUser } from './user-trials.js';
import {
  DEFAULT_COHORT,
  type CohortInput,
  type CohortUpdateInput,
  type ProtocolSettingsInput,
  type TrialCreateInput,
  type TrialUpdateInput,
} from './trials.schema.js';

const fieldsOf = (input: TrialCreateInput | TrialUpdateInput): TrialFields => ({
  code: input.code,
  title: input.title,
  indication: input.indication,
  endpointDefinition: input.endpointDefinition,
  sponsorName: input.sponsorName ?? null,
  plannedAccrualPerMonth: input.plannedAccrualPerMonth ?? null,
  startDate: input.startDate ?? null,
});

/** What the audit trail keeps of a trial: its own fields and its sites, not the derived status. */
const auditView = (trial: TrialDetail) => ({
  code: trial.code,
  title: trial.title,
  indication: trial.indication,
  endpointDefinition: trial.endpointDefinition,
  sponsorName: trial.sponsorName,
  plannedAccrualPerMonth: trial.plannedAccrualPerMonth,
  startDate: trial.startDate,
  sites: trial.sites.map((s) => ({ code: s.code, plannedAccrualPerMonth: s.plannedAccrualPerMonth })),
});

const codeTaken = (code: string) => new ConflictError(`A trial with code ${code} already exists.`, { fields: { code: 'This code is already in use.' } });

async function checkSitesExist(db: Db, sites: Array<{ siteId: string }>): Promise<void> {
  const ids = sites.map((s) => s.siteId);
  const found = await existingSiteIds(db, ids);
  const missing = sites.findIndex((s) => !found.has(s.siteId));
  if (missing >= 0) throw new InputError('A chosen site does not exist.', { [`sites[${missing}].siteId`]: 'This site does not exist.' });
}

async function lockTrial(db: Db, trialId: string): Promise<TrialDetail> {
  const trial = await findTrialDetail(db, trialId, { lock: true });
  if (!trial) throw new NotFoundError('The trial');
  return trial;
}

function checkVersion(trial: TrialDetail, version: number): void {
  if (trial.version !== version) {
    throw new ConflictError('Someone else changed this trial in the meantime. Review the current record and apply your change again.', {
      current: trial,
    });
  }
}

/** Every trial the user holds an active role on, with those roles. */
export async function trialsFor(db: Db, user: SessionUser, read?: FirstRead): Promise<TrialForUser[]> {
  return listTrialsForUser(db, user.id, read);
}

/** The trial as its set-up forms and overview need it, with the actor's roles and sites on it. */
export async function trialDetail(db: Db, actor: Actor): Promise<TrialDetail & { myRoles: Role[]; mySiteIds: string[] }> {
  const trial = await findTrialDetail(db, actor.access.trialId);
  if (!trial) throw new NotFoundError('The trial');
  return { ...trial, myRoles: actor.access.roles, mySiteIds: actor.access.siteIds };
}

/** Any trial manager creates a trial, and becomes its admin. */
export async function createTrial(db: Db, user: SessionUser, input: TrialCreateInput): Promise<TrialDetail> {
  return db.transaction(async (trx) => {
    await checkSitesExist(trx, input.sites);
    const trialId = await insertTrial(trx, fieldsOf(input), user.id);
    if (!trialId) throw codeTaken(input.code);
    const cohorts = input.cohorts.length > 0 ? input.cohorts : [DEFAULT_COHORT];
    await insertCohorts(
      trx,
      trialId,
      cohorts.map((c, i) => ({ code: c.code, name: c.name, position: i + 1 })),
    );
    await setTrialSites(trx, trialId, input.sites.map((s) => ({ siteId: s.siteId, plannedAccrualPerMonth: s.plannedAccrualPerMonth ?? null })));
    // The creator manages the new trial; without this nobody could open it.
    const membershipId = (await insertMembership(trx, { trialId, email: user.email, role: 'admin', siteId: null, userId: user.id, status: 'active', invitedBy: user.id })) as string;
    const trial = (await findTrialDetail(trx, trialId)) as TrialDetail;
    await writeAudit(trx, { actorUserId: user.id, trialId, entityType: 'trial', entityId: trialId, action: 'created', after: auditView(trial) });
    for (const cohort of trial.cohorts) {
      await writeAudit(trx, {
        actorUserId: user.id,
        trialId,
        entityType: 'cohort',
        entityId: cohort.id,
        action: 'created',
        after: { code: cohort.code, name: cohort.name },
      });
    }
    await writeAudit(trx, {
      actorUserId: user.id,
      trialId,
      entityType: 'membership',
      entityId: membershipId,
      action: 'created',
      after: { email: user.email, role: 'admin', status: 'active' },
    });
    return trial;
  });
}

export async function updateTrial(db: Db, { user, access }: Actor, input: TrialUpdateInput): Promise<TrialDetail> {
  const { trialId } = access;
  return db.transaction(async (trx) => {
    const before = await lockTrial(trx, trialId);
    checkVersion(before, input.version);
    await checkSitesExist(trx, input.sites);
    const kept = new Set(input.sites.map((s) => s.siteId));
    const dropped = before.sites.filter((s) => !kept.has(s.id)).map((s) => s.id);
    const busy = await sitesInUse(trx, trialId, dropped);
    if (busy.length > 0) {
      const names = busy.map((b) => `${b.code} (${b.patients} patients, ${b.members} members)`).join(', ');
      throw new ConflictError(`A site with patients or members cannot leave the trial: ${names}.`, { fields: { sites: `Still in use: ${names}.` } });
    }
    if (!(await updateTrialRow(trx, trialId, fieldsOf(input)))) throw codeTaken(input.code);
    await setTrialSites(trx, trialId, input.sites.map((s) => ({ siteId: s.siteId, plannedAccrualPerMonth: s.plannedAccrualPerMonth ?? null })));
    const after = (await findTrialDetail(trx, trialId)) as TrialDetail;
    await writeAudit(trx, { actorUserId: user.id, trialId, entityType: 'trial', entityId: trialId, action: 'updated', before: auditView(before), after: auditView(after) });
    return after;
  });
}

function requireDraft(trial: TrialDetail): void {
  if (trial.status !== 'draft') {
    throw new ConflictError('Cohorts can be added or changed only while the trial is a draft.', { currentStatus: trial.status });
  }
}

export async function addCohort(db: Db, { user, access }: Actor, input: CohortInput): Promise<Cohort> {
  const { trialId } = access;
  return db.transaction(async (trx) => {
    const trial = await lockTrial(trx, trialId);
    requireDraft(trial);
    if (trial.cohorts.some((c) => c.code === input.code)) {
      throw new ConflictError(`The trial already has a cohort ${input.code}.`, { fields: { code: 'This code is already in use on this trial.' } });
    }
    const position = Math.max(0, ...trial.cohorts.map((c) => c.position)) + 1;
    const [cohort] = await insertCohorts(trx, trialId, [{ code: input.code, name: input.name, position }]);
    await writeAudit(trx, { actorUserId: user.id, trialId, entityType: 'cohort', entityId: cohort.id, action: 'created', after: { code: cohort.code, name: cohort.name } });
    return cohort;
  });
}

export async function updateCohort(db: Db, { user, access }: Actor, cohortId: string, input: CohortUpdateInput): Promise<Cohort> {
  const { trialId } = access;
  return db.transaction(async (trx) => {
    const trial = await lockTrial(trx, trialId);
    const before = await findCohort(trx, trialId, cohortId, { lock: true });
    if (!before) throw new NotFoundError('The cohort');
    if (before.version !== input.version) {
      throw new ConflictError('Someone else changed this cohort in the meantime.', { current: before });
    }
    requireDraft(trial);
    if (trial.cohorts.some((c) => c.code === input.code && c.id !== cohortId)) {
      throw new ConflictError(`The trial already has a cohort ${input.code}.`, { fields: { code: 'This code is already in use on this trial.' } });
    }
    const after = await updateCohortRow(trx, cohortId, { code: input.code, name: input.name });
    await writeAudit(trx, {
      actorUserId: user.id,
      trialId,
      entityType: 'cohort',
      entityId: cohortId,
      action: 'updated',
      before: { code: before.code, name: before.name },
      after: { code: after.code, name: after.name },
    });
    return after;
  });
}

export async function updateProtocolSettings(db: Db, hooks: Hooks, { user, access }: Actor, input: ProtocolSettingsInput): Promise<TrialDetail> {
  const { trialId } = access;
  return db.transaction(async (trx) => {
    const before = await lockTrial(trx, trialId);
    checkVersion(before, input.version);
    // Once patients are enrolled the rules change how their outcomes count: say why.
    if (!input.reason && (await countPatientsInTrial(trx, trialId)) > 0) {
      throw new InputError('Patients are enrolled: give a reason for changing the protocol settings.', {
        reason: 'A reason is required once patients are enrolled.',
      });
    }
    const { reason, version: _version, ...settings } = input;
    await updateProtocolSettingsRow(trx, trialId, settings);
    const after = (await findTrialDetail(trx, trialId)) as TrialDetail;
    // The outcome rules changed: whatever rests on them follows in this transaction.
    await emit(trx, hooks.protocolSettingsChanged, { trialId, actorUserId: user.id });
    await writeAudit(trx, {
      actorUserId: user.id,
      trialId,
      entityType: 'trial',
      entityId: trialId,
      action: 'protocol_settings_changed',
      before: before.protocolSettings,
      after: after.protocolSettings,
      reason,
    });
    return after;
  });
}
