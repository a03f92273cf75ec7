/**
 * The invented demo scenario: sponsor "Tessaly Bio", agent TSY-17, five trials, four sites and one
 * person per role, each a member of every demo trial in that role (the README lists the accounts).
 */
import type { Knex } from 'knex';

export const DEMO_SITES = [
  { code: 'RVG', name: 'Riverside General', country: 'United Kingdom' },
  { code: 'HCC', name: 'Harbour Cancer Centre', country: 'Ireland' },
  { code: 'LUH', name: 'Lakeshore University Hospital', country: 'Canada' },
  { code: 'NGC', name: 'Northgate Clinic', country: 'Australia' },
];

export const DEMO_PEOPLE = [
  { email: 'ada.admin@tessaly.test', name: 'Ada Admin', role: 'admin', site: null },
  { email: 'sam.stat@tessaly.test', name: 'Sam Stat', role: 'statistician', site: null },
  { email: 'cora.coord@tessaly.test', name: 'Cora Coord', role: 'coordinator', site: 'RVG' },
  { email: 'ivan.inv@tessaly.test', name: 'Ivan Inv', role: 'investigator', site: 'HCC' },
  { email: 'mona.monitor@tessaly.test', name: 'Mona Monitor', role: 'monitor', site: null },
  { email: 'spencer.sponsor@tessaly.test', name: 'Spencer Sponsor', role: 'sponsor', site: null },
] as const;

type DemoTrial = {
  code: string;
  title: string;
  indication: string;
  endpoint: string;
  monthly: number;
  monthsAgo: number;
  cohorts: Array<{ code: string; name: string }>;
};

const ORR = 'Objective response (CR or PR) by RECIST 1.1, investigator-assessed, confirmed at least 4 weeks apart';

export const DEMO_TRIALS: DemoTrial[] = [
  {
    code: 'TSY-201',
    title: 'TSY-17 in recurrent platinum-resistant ovarian cancer',
    indication: 'Recurrent ovarian cancer',
    endpoint: ORR,
    monthly: 3,
    monthsAgo: 17,
    cohorts: [{ code: 'MAIN', name: 'All patients' }],
  },
  {
    code: 'TSY-202',
    title: 'TSY-17 in advanced soft-tissue sarcoma',
    indication: 'Soft-tissue sarcoma',
    endpoint: ORR,
    monthly: 2,
    monthsAgo: 12,
    cohorts: [{ code: 'MAIN', name: 'All patients' }],
  },
  {
    code: 'TSY-203',
    title: 'TSY-17 in previously treated biliary tract cancer',
    indication: 'Biliary tract cancer',
    endpoint: ORR,
    monthly: 2,
    monthsAgo: 16,
    cohorts: [{ code: 'MAIN', name: 'All patients' }],
  },
  {
    code: 'TSY-204',
    title: 'TSY-17 basket study in tumours with the target alteration',
    indication: 'Solid tumours (basket)',
    endpoint: ORR,
    monthly: 4,
    monthsAgo: 9,
    cohorts: [
      { code: 'NSCLC', name: 'Non-small-cell lung cancer' },
      { code: 'CRC', name: 'Colorectal cancer' },
      { code: 'THY', name: 'Thyroid cancer' },
    ],
  },
  {
    code: 'TSY-205',
    title: 'TSY-17 in recurrent glioblastoma',
    indication: 'Recurrent glioblastoma',
    endpoint: ORR,
    monthly: 2,
    monthsAgo: 0,
    cohorts: [{ code: 'MAIN', name: 'All patients' }],
  },
];

function monthsBefore(today: Date, months: number): string {
  const d = new Date(Date.UTC(today.getUTCFullYear(), today.getUTCMonth() - months, 1));
  return d.toISOString().slice(0, 10);
}

/** Inserts what is missing; running it again changes nothing. Returns the trial ids by code. */
export async function seedPeopleAndTrials(trx: Knex.Transaction, today: Date): Promise<Map<string, string>> {
  await trx('sites').insert(DEMO_SITES).onConflict('code').ignore();
  const sites = new Map<string, string>((await trx('sites').select('code', 'id')).map((s) => [s.code, s.id]));

  for (const person of DEMO_PEOPLE) {
    const exists = await trx('users').whereRaw('lower(email) = ?', [person.email]).first();
    if (!exists) await trx('users').insert({ email: person.email, name: person.name });
  }
  const users = new Map<string, string>(
    (await trx('users').whereIn('email', DEMO_PEOPLE.map((p) => p.email)).select('email', 'id')).map((u) => [u.email, u.id]),
  );

  const trialIds = new Map<string, string>();
  for (const trial of DEMO_TRIALS) {
    let row = await trx('trials').where({ code: trial.code }).first();
    if (!row) {
      [row] = await trx('trials')
        .insert({
          code: trial.code,
          title: trial.title,
          indication: trial.indication,
          endpoint_definition: trial.endpoint,
          planned_accrual_per_month: trial.monthly,
          start_date: monthsBefore(today, trial.monthsAgo),
          sponsor_name: 'Tessaly Bio',
          created_by: users.get('ada.admin@tessaly.test'),
        })
        .returning('*');
      await trx('cohorts').insert(trial.cohorts.map((c, i) => ({ trial_id: row.id, code: c.code, name: c.name, position: i + 1 })));
      await trx('trial_sites').insert(
        DEMO_SITES.map((s) => ({ trial_id: row.id, site_id: sites.get(s.code), planned_accrual_per_month: 1 })),
      );
      await trx('memberships').insert(
        DEMO_PEOPLE.map((p) => ({
          trial_id: row.id,
          user_id: users.get(p.email),
          email: p.email,
          role: p.role,
          site_id: p.site ? sites.get(p.site) : null,
          status: 'active',
        })),
      );
    }
    trialIds.set(trial.code, row.id);
  }
  return trialIds;
}
