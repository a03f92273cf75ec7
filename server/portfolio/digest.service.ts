/**
 * The weekly digest to sponsors: one e-mail per sponsor summarising accrual of the trials they
 * sponsor — aggregate counts, the next milestone, projections and idle sites; response figures as
 * the visibility rule gives them to a sponsor (the released cut's frozen figures with its date, live
 * ones only where the locked design allows), even when the recipient holds other roles too (mail
 * travels further than a screen). The scheduled job (server/jobs/weekly-digest.ts) queues these once
 * per ISO week; the development preview renders one without queueing it.
 */
import type { Db } from '../db/knex.js';
import type { SessionUser } from '../auth/access.js';
import { listTrialsForUser, type TrialForUser } from '../trials/index.js';
import { isoWeekOf, toDay, trialAccrual, type TrialAccrual } from '../accrual/index.js';
import { portfolioRows, type PortfolioRow, type ResponseFigures } from './portfolio.service.js';
import { sponsorRecipients, type SponsorRecipient } from '../people/index.js';
import { DECISION_SUPPORT_ONLY, INTERIM_DATA, NAIVE_ESTIMATES, plural } from '../words/index.js';

/** A sponsor's digest carries no design deviations to read, so the fourth standing caution is left out. */
const CAUTIONS = [DECISION_SUPPORT_ONLY, INTERIM_DATA, NAIVE_ESTIMATES];

export type Digest = { period: string; to: string; subject: string; text: string };

/** The digest is written as a sponsor sees the trial, whatever else the recipient holds there. */
const SPONSOR_VIEW = { roles: ['sponsor' as const], siteIds: [] };

function responseWords(figures: ResponseFigures): string {
  const rate = figures.responseRate === null ? '—' : `${(figures.responseRate * 100).toFixed(1)}%`;
  return `${plural(figures.responders, 'responder')} among ${plural(figures.outcomesKnown, 'decided patient')} (${rate}, naive estimate)`;
}

function cohortLines(row: PortfolioRow, accrual: TrialAccrual): string[] {
  const target = row.design
    ? [row.design.n1 !== null ? `n1 = ${row.design.n1}` : null, `n = ${row.design.n}`].filter(Boolean).join(', ')
    : 'no design locked';
  const lines = [
    `  ${row.cohortCount > 1 ? `Cohort ${row.cohortCode} (${row.cohortName})` : 'Status'}: ${row.statusWords}${row.design ? `, ${row.design.n1 === null ? 'single-stage' : 'two-stage'} design` : ''}`,
    `    Enrolled ${row.enrolled} (${row.enrolledLastWeek} in the last 7 days), ${row.counted} counting toward ${target}; ${plural(row.pendingOutcomes, 'outcome')} pending`,
    `    Next: ${row.nextMilestone.text}`,
  ];
  const cohort = accrual.cohorts.find((c) => c.cohortId === row.cohortId);
  for (const projection of cohort?.projections.targets ?? []) {
    const label = `${projection.target} = ${projection.size}`;
    if (projection.reached) lines.push(`    ${label}: reached`);
    else {
      const range = projection.earliest ? ` (range ${projection.earliest} to ${projection.latest ?? 'no latest date'})` : '';
      lines.push(`    ${label}: ${projection.expected ? `expected ${projection.expected}${range}` : 'cannot project'} — ${projection.note}`);
    }
  }
  // The projection keeps the live keys exactly when it gives no reason for hiding them.
  const live = row.efficacyHidden === undefined ? (row as PortfolioRow & ResponseFigures) : null;
  if (live) lines.push(`    Response (live): ${responseWords(live)}`);
  if (row.released) lines.push(`    Response ${row.released.label}: ${responseWords(row.released)}`);
  if (!live && !row.released) lines.push(`    Response figures: not shown. ${row.efficacyHidden}`);
  if (row.lastRecommendation) lines.push(`    Last committee recommendation: ${row.lastRecommendation.words} (${row.lastRecommendation.on})`);
  return lines;
}

function trialLines(trial: TrialForUser, rows: PortfolioRow[], accrual: TrialAccrual): string[] {
  const totals = accrual.totals;
  return [
    `${trial.code} — ${trial.title} (${trial.indication})`,
    `  Enrolled ${totals.enrolled} across ${plural(accrual.sites.filter((s) => s.enrolled > 0).length, 'site')}; last enrolment ${totals.lastEnrolledOn ?? 'none yet'}`,
    ...rows.flatMap((row) => cohortLines(row, accrual)),
    ...accrual.warnings.map((w) => `  Warning: ${w.text}`),
    '',
  ];
}

type TrialCache = Map<string, Promise<TrialAccrual>>;

async function composeDigest(db: Db, recipient: SponsorRecipient, now: Date, cache: TrialCache): Promise<Digest | null> {
  const today = toDay(now);
  const period = isoWeekOf(today);
  const trials = (await listTrialsForUser(db, recipient.userId)).filter((t) => recipient.trialIds.includes(t.id));
  if (trials.length === 0) return null;
  const rows = await portfolioRows(db, trials, { today, viewAs: SPONSOR_VIEW });
  const sections: string[] = [];
  for (const trial of trials) {
    if (!cache.has(trial.id)) cache.set(trial.id, trialAccrual(db, trial.id, { today, sites: 'all' }));
    sections.push(...trialLines(trial, rows.filter((r) => r.trialId === trial.id), await (cache.get(trial.id) as Promise<TrialAccrual>)));
  }
  const text = [
    `Orrery weekly digest, week ${period} (figures as of ${today})`,
    `For ${recipient.name ?? recipient.email}: accrual of the ${plural(trials.length, 'trial')} you sponsor. Aggregate counts only; response figures are those of the data cut a committee decision released, as of that cut's date (live ones only where the protocol allows it). Projections use the last 90 days' accrual; the range comes from the slowest and fastest of the last complete months.`,
    '',
    ...sections,
    'Read with care:',
    ...CAUTIONS.map((c) => `- ${c}`),
  ].join('\n');
  return { period, to: recipient.email, subject: `Orrery weekly digest ${period}: ${plural(trials.length, 'trial')}`, text };
}

/** The digest one user would receive this week, or null when they sponsor no trial. */
export async function digestFor(db: Db, user: SessionUser, now: Date): Promise<Digest | null> {
  const recipient = (await sponsorRecipients(db)).find((r) => r.userId === user.id);
  return recipient ? composeDigest(db, recipient, now, new Map()) : null;
}

/** This week's digest of every sponsor; a trial's accrual is computed once however many sponsors it has. */
export async function weeklyDigests(db: Db, now: Date): Promise<Array<{ userId: string; digest: Digest }>> {
  const cache: TrialCache = new Map();
  const digests: Array<{ userId: string; digest: Digest }> = [];
  for (const recipient of await sponsorRecipients(db)) {
    const digest = await composeDigest(db, recipient, now, cache);
    if (digest) digests.push({ userId: recipient.userId, digest });
  }
  return digests;
}
