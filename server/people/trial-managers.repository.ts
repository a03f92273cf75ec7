/**
 * The trial-manager grants store: who may create sites and trials before they manage any trial
 * (the first trial manager of an installation, granted from the command line).
 */
import type { Knex } from 'knex';
import type { Db } from '../db/knex.js';

export async function hasTrialManagerGrant(db: Db, userId: string): Promise<boolean> {
  const [row] = await db.select({ granted: trialManagerGrantExists(db, userId) });
  return row.granted as boolean;
}

/** Whether the user holds a trial manager grant, as one boolean expression for a read that gathers several things. */
export function trialManagerGrantExists(db: Db, userId: string): Knex.Raw {
  return db.raw('exists(?)', [db('trial_manager_grants').where({ user_id: userId }).select('id')]);
}

/** Whether anyone already manages trials here: an admin membership on any trial, or a grant. */
export async function anyTrialManager(db: Db): Promise<boolean> {
  const admin = await db('memberships').where({ role: 'admin' }).first('id');
  return Boolean(admin ?? (await db('trial_manager_grants').first('id')));
}

export async function insertTrialManagerGrant(db: Db, grant: { email: string; userId: string | null; grantedFrom: string }): Promise<string> {
  const [row] = await db('trial_manager_grants')
    .insert({ email: grant.email, user_id: grant.userId, granted_from: grant.grantedFrom })
    .returning('id');
  return row.id as string;
}
