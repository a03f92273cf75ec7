/** Builders for People & sites tests: sites, memberships and valid request bodies. */
import { randomBytes } from 'node:crypto';
import type { Db } from '../../server/db/knex.js';

const unique = () => randomBytes(3).toString('hex').toUpperCase();

/** A site code that no other test uses (2–8 capitals or digits). */
export const uniqueSiteCode = () => `S${unique()}`.slice(0, 7);

export async function createSite(db: Db, fields: { code?: string; name?: string; country?: string } = {}): Promise<{ id: string; code: string; version: number }> {
  const code = fields.code ?? uniqueSiteCode();
  const [row] = await db('sites')
    .insert({ code, name: fields.name ?? `${code} Infirmary`, country: fields.country ?? 'Testland' })
    .returning(['id', 'code', 'version']);
  return row;
}

/** A pending membership for someone who has never signed in. */
export async function createPendingMembership(
  db: Db,
  trialId: string,
  fields: { email?: string; role?: string; siteId?: string | null } = {},
): Promise<{ id: string; email: string; version: number }> {
  const email = fields.email ?? `invitee.${unique().toLowerCase()}@tessaly.test`;
  const [row] = await db('memberships')
    .insert({ trial_id: trialId, email, role: fields.role ?? 'monitor', site_id: fields.siteId ?? null, status: 'pending' })
    .returning(['id', 'email', 'version']);
  return row;
}

export function trialBody(overrides: Record<string, unknown> = {}) {
  return {
    code: `TX-${unique()}`,
    title: 'TSY-17 in an invented indication',
    indication: 'Invented indication',
    endpointDefinition: 'Objective response (CR or PR) by RECIST 1.1',
    plannedAccrualPerMonth: 3,
    startDate: '2026-03-01',
    sponsorName: 'Tessaly Bio',
    sites: [],
    ...overrides,
  };
}

export const protocolSettingsBody = (version: number, overrides: Record<string, unknown> = {}) => ({
  outcomeSource: 'derived',
  confirmationRequired: true,
  confirmationMinDays: 28,
  sdMinDays: 42,
  neBetweenResponses: 'ignore',
  assessmentIntervalDays: 56,
  inactivityWarningWeeks: 6,
  version,
  ...overrides,
});

export async function auditCount(db: Db): Promise<number> {
  const [{ count }] = await db('audit_log').count({ count: '*' });
  return Number(count);
}

let patientSeq = 0;

/** An enrolled patient, so that rules which apply "once patients are enrolled" can be tested. */
export async function enrolPatient(db: Db, trial: { trialId: string; cohortIds: string[] }, siteId: string): Promise<string> {
  patientSeq += 1;
  const [row] = await db('patients')
    .insert({
      trial_id: trial.trialId,
      cohort_id: trial.cohortIds[0],
      site_id: siteId,
      study_id: `P${unique()}-${patientSeq}`,
      enrolled_on: '2026-02-01',
      enrolment_seq: patientSeq,
    })
    .returning('id');
  return row.id;
}
