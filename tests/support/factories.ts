/** Test data builders: each test arranges its own rows (the demo seed is for people, not tests). */
import { randomBytes } from 'node:crypto';
import type { Db } from '../../server/db/knex.js';

export const DEMO = {
  admin: 'ada.admin@tessaly.test',
  statistician: 'sam.stat@tessaly.test',
  coordinator: 'cora.coord@tessaly.test',
  investigator: 'ivan.inv@tessaly.test',
  monitor: 'mona.monitor@tessaly.test',
  sponsor: 'spencer.sponsor@tessaly.test',
} as const;

export type RoleName = keyof typeof DEMO;

const unique = () => randomBytes(3).toString('hex').toUpperCase();

export async function ensureUser(db: Db, email: string, name?: string): Promise<string> {
  const existing = await db('users').whereRaw('lower(email) = ?', [email.toLowerCase()]).first();
  if (existing) return existing.id;
  const [row] = await db('users').insert({ email: email.toLowerCase(), name: name ?? email.split('@')[0] }).returning('id');
  return row.id;
}

export async function ensureSite(db: Db, code: string, name = `${code} Hospital`): Promise<string> {
  await db('sites').insert({ code, name, country: 'Testland' }).onConflict('code').ignore();
  return (await db('sites').where({ code }).first()).id;
}

export type Member = { email: string; role: RoleName; site?: string };

export type TrialFixture = { trialId: string; code: string; cohortIds: string[]; siteIds: Record<string, string> };

/**
 * A trial with cohorts, sites and active memberships. By default every demo person holds their
 * demo role (coordinator at site A, investigator at site B).
 */
export async function createTrial(
  db: Db,
  options: { code?: string; cohorts?: string[]; sites?: string[]; members?: Member[] } = {},
): Promise<TrialFixture> {
  const code = options.code ?? `T-${unique()}`;
  const siteCodes = options.sites ?? ['SA', 'SB'];
  const siteIds: Record<string, string> = {};
  for (const site of siteCodes) siteIds[site] = await ensureSite(db, site);
  const [trial] = await db('trials')
    .insert({
      code,
      title: `Test trial ${code}`,
      indication: 'Test indication',
      endpoint_definition: 'Objective response by RECIST 1.1',
      planned_accrual_per_month: 4,
      start_date: '2026-01-01',
    })
    .returning('id');
  const cohortCodes = options.cohorts ?? ['MAIN'];
  const cohorts = await db('cohorts')
    .insert(cohortCodes.map((c, i) => ({ trial_id: trial.id, code: c, name: `Cohort ${c}`, position: i + 1 })))
    .returning('id');
  await db('trial_sites').insert(siteCodes.map((s) => ({ trial_id: trial.id, site_id: siteIds[s] })));
  const members: Member[] = options.members ?? [
    { email: DEMO.admin, role: 'admin' },
    { email: DEMO.statistician, role: 'statistician' },
    { email: DEMO.coordinator, role: 'coordinator', site: siteCodes[0] },
    { email: DEMO.investigator, role: 'investigator', site: siteCodes[1] ?? siteCodes[0] },
    { email: DEMO.monitor, role: 'monitor' },
    { email: DEMO.sponsor, role: 'sponsor' },
  ];
  for (const member of members) await addMember(db, trial.id, member, siteIds);
  return { trialId: trial.id, code, cohortIds: cohorts.map((c: { id: string }) => c.id), siteIds };
}

export async function addMember(db: Db, trialId: string, member: Member, siteIds: Record<string, string> = {}): Promise<void> {
  const userId = await ensureUser(db, member.email);
  const siteId = member.site ? (siteIds[member.site] ?? (await ensureSite(db, member.site))) : null;
  await db('memberships').insert({ trial_id: trialId, user_id: userId, email: member.email, role: member.role, site_id: siteId, status: 'active' });
}

export async function countRows(db: Db, table: string): Promise<number> {
  const [{ count }] = await db(table).count({ count: '*' });
  return Number(count);
}
