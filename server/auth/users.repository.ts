/** Users are provisioned from the identity provider's claims; pending invitations and trial-manager grants attach on first sign-in. */
import type { Db } from '../db/knex.js';
import { writeAudit } from '../audit/audit.js';
import type { SessionUser } from './access.js';

export async function provisionUser(db: Db, claims: { subject: string; email: string; name: string | null }): Promise<SessionUser> {
  return db.transaction(async (trx) => {
    const existing = await trx('users')
      .where({ subject: claims.subject })
      .orWhere((q) => {
        q.whereNull('subject').andWhereRaw('lower(email) = ?', [claims.email]);
      })
      .orderByRaw('subject is null')
      .first();
    let user: { id: string; email: string; name: string | null };
    if (existing) {
      [user] = await trx('users')
        .where({ id: existing.id })
        .update({ subject: claims.subject, email: claims.email, name: claims.name ?? existing.name, last_sign_in_at: trx.fn.now() })
        .returning(['id', 'email', 'name']);
    } else {
      [user] = await trx('users')
        .insert({ subject: claims.subject, email: claims.email, name: claims.name, last_sign_in_at: trx.fn.now() })
        .returning(['id', 'email', 'name']);
      await writeAudit(trx, { actorUserId: user.id, entityType: 'user', entityId: user.id, action: 'provisioned', after: { email: user.email } });
    }
    const activated = await trx('memberships')
      .whereRaw('lower(email) = ?', [claims.email])
      .andWhere((q) => {
        q.where({ status: 'pending' }).orWhereNull('user_id');
      })
      .update({ user_id: user.id, status: 'active', updated_at: trx.fn.now() })
      .returning(['id', 'trial_id', 'role']);
    const granted = await trx('trial_manager_grants').whereRaw('lower(email) = ?', [claims.email]).whereNull('user_id').update({ user_id: user.id }).returning('id');
    for (const grant of granted) {
      await writeAudit(trx, { actorUserId: user.id, entityType: 'trial_manager_grant', entityId: grant.id, action: 'activated', after: { email: user.email } });
    }
    for (const membership of activated) {
      await writeAudit(trx, {
        actorUserId: user.id,
        trialId: membership.trial_id,
        entityType: 'membership',
        entityId: membership.id,
        action: 'activated',
        before: { status: 'pending' },
        after: { status: 'active', role: membership.role },
      });
    }
    return user;
  });
}
