/**
 * The Accrual page's API over HTTP: cumulative enrolment against the plan, the per-site table,
 * projections from the last 90 days, warnings for idle sites, and what each role receives.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly, type DirectPatient } from '../support/patient-factories.js';
import { PATIENT_LEVEL_KEYS, RESPONSE_KEYS, daysAgo, keysDeep, setSitePlan, setTrialFields, today } from '../support/accrual-factories.js';
import { addDays } from '../../server/accrual/calendar.js';
import type { Session } from '../support/sign-in.js';

let stack: Stack;
let trial: TrialFixture;
let statistician: Session;
let sponsor: Session;

const at = (days: number[], outcome: DirectPatient['outcome'] = 'non_responder'): DirectPatient[] => days.map((d) => ({ enrolledOn: daysAgo(d), outcome }));

/**
 * Site SA: 3 patients 120, 110 and 100 days ago (one not evaluable), then 9 in the last 90 days,
 * the last three still pending, the latest 20 days ago. Site SB: 9 in the last 90 days, the last
 * four pending, the latest 29 days ago. 21 enrolled, 18 of them in the last 90 days.
 */
beforeAll(async () => {
  stack = await startStack();
  trial = await createTrial(stack.db);
  await setTrialFields(stack.db, trial.trialId, { startDate: daysAgo(200), plannedPerMonth: 4, inactivityWarningWeeks: 4 });
  await setSitePlan(stack.db, trial.trialId, trial.siteIds.SA, 2);
  await setSitePlan(stack.db, trial.trialId, trial.siteIds.SB, 2);
  const cohortId = trial.cohortIds[0];
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId });
  const enrol = (site: 'SA' | 'SB', patients: DirectPatient[]) => enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds[site], patients });
  await enrol('SA', [{ enrolledOn: daysAgo(120), outcome: 'responder' }, { enrolledOn: daysAgo(110), evaluable: false, outcome: 'pending' }, ...at([100])]);
  await enrol('SB', at([88, 78, 68, 58, 48]));
  await enrol('SA', [...at([85, 75, 65, 55, 45, 35]), ...at([30, 25, 20], 'pending')]);
  await enrol('SB', at([40, 36, 33, 29], 'pending'));
  statistician = await stack.signIn(DEMO.statistician);
  sponsor = await stack.signIn(DEMO.sponsor);
}, 120_000);
afterAll(async () => stack?.close());

const accrualOf = async (session: Session) => {
  const res = await session.get(`/api/trials/${trial.trialId}/accrual`);
  expect(res.status).toBe(200);
  return res.body.accrual;
};

type Site = { code: string; [key: string]: unknown };

describe('GET /api/trials/:trialId/accrual', () => {
  it('when patients were enrolled at two sites, then the per-site table and the totals count them', async () => {
    const accrual = await accrualOf(statistician);
    expect(accrual.totals).toMatchObject({ enrolled: 21, evaluable: 20, pendingOutcomes: 7, daysSinceLastEnrolment: 20 });
    const sites = Object.fromEntries(accrual.sites.map((s: Site) => [s.code, s]));
    expect(sites.SA).toMatchObject({ enrolled: 12, evaluable: 11, pendingOutcomes: 3, daysSinceLastEnrolment: 20, lastEnrolledOn: daysAgo(20), plannedPerMonth: 2 });
    expect(sites.SB).toMatchObject({ enrolled: 9, evaluable: 9, pendingOutcomes: 4, daysSinceLastEnrolment: 29 });
  });

  it('when the plan is 4 patients a month from 200 days ago, then the cumulative curves end at the enrolled total and at the plan to date', async () => {
    const { timeline, sites } = await accrualOf(statistician);
    // 201 days (start day included) × 4 / 30.4375 days a month = 26.41 → 26.4; each site's 2 a month → 13.2.
    expect(timeline.monthly.at(-1)).toMatchObject({ cumulative: 21, planned: 26.4 });
    expect(timeline.weekly.at(-1)).toMatchObject({ cumulative: 21, planned: 26.4 });
    expect(timeline.monthly[0].start <= daysAgo(200)).toBe(true);
    expect(timeline.weekly.reduce((total: number, p: { enrolled: number }) => total + p.enrolled, 0)).toBe(21);
    expect(sites.find((s: Site) => s.code === 'SA').monthly.at(-1)).toEqual(expect.objectContaining({ cumulative: 12, planned: 13.2 }));
  });

  it('when 18 patients came in the last 90 days and 22 are still needed for n, then n is expected in 110 days', async () => {
    const [cohort] = (await accrualOf(statistician)).cohorts;
    // Window: the last 90 days (enrolment began 120 days ago). Rate 18 / 90 = 0.2 a day.
    // n1 = 13 is reached (21 counted); n = 43 needs 22 more: 22 / 0.2 = 110 days from today.
    expect(cohort.projections.window).toEqual({ from: daysAgo(89), to: today(), days: 90, enrolled: 18 });
    const [n1, n] = cohort.projections.targets;
    expect(n1).toMatchObject({ target: 'n1', size: 13, reached: true, expected: null });
    expect(n).toMatchObject({ target: 'n', size: 43, counted: 21, remaining: 22, expected: addDays(today(), 110) });
    expect(n.ratePerMonth).toBeCloseTo(0.2 * 30.4375, 10);
    expect(cohort.projections.months.length).toBeGreaterThanOrEqual(3);
  });

  it('when a site has enrolled nobody for the configured weeks, then it is warned about, and a shorter setting warns sooner', async () => {
    // Four weeks configured: SB's last enrolment is 29 days old (≥ 28), SA's 20 days (< 28).
    let accrual = await accrualOf(statistician);
    expect(accrual.inactivityWarningWeeks).toBe(4);
    expect(accrual.warnings.map((w: { siteCode: string }) => w.siteCode)).toEqual(['SB']);
    expect(accrual.warnings[0].text).toBe(`SB has enrolled nobody for 4 weeks (last enrolment ${daysAgo(29)}).`);
    expect(accrual.sites.find((s: Site) => s.code === 'SB').inactive).toBe(true);
    await setTrialFields(stack.db, trial.trialId, { inactivityWarningWeeks: 2 });
    accrual = await accrualOf(statistician);
    expect(accrual.warnings.map((w: { siteCode: string }) => w.siteCode)).toEqual(['SA', 'SB']);
    await setTrialFields(stack.db, trial.trialId, { inactivityWarningWeeks: 4 });
  });

  it('when a listed site never enrolled anybody, then the warning counts from the later of the trial start and the site joining', async () => {
    const other = await createTrial(stack.db, { sites: ['SA', 'SC'] });
    // The sites joined the trial 60 days ago, before its start 50 days ago: the start counts.
    await stack.db('trial_sites').where({ trial_id: other.trialId }).update({ created_at: new Date(Date.now() - 60 * 86_400_000) });
    await setTrialFields(stack.db, other.trialId, { startDate: daysAgo(50), inactivityWarningWeeks: 6 });
    await lockDesignDirectly(stack.db, { trialId: other.trialId, cohortId: other.cohortIds[0] });
    await enrolPatientsDirectly(stack.db, { trialId: other.trialId, cohortId: other.cohortIds[0], siteId: other.siteIds.SA, patients: at([3]) });
    const res = await statistician.get(`/api/trials/${other.trialId}/accrual`);
    expect(res.body.accrual.warnings).toEqual([expect.objectContaining({ siteCode: 'SC', lastEnrolledOn: null, weeks: 7 })]);
  });

  it('when no cohort is enrolling, then idle sites are not warned about', async () => {
    const other = await createTrial(stack.db);
    await setTrialFields(stack.db, other.trialId, { startDate: daysAgo(300), inactivityWarningWeeks: 4 });
    await lockDesignDirectly(stack.db, { trialId: other.trialId, cohortId: other.cohortIds[0], cohortStatus: 'stopped' });
    const res = await statistician.get(`/api/trials/${other.trialId}/accrual`);
    expect(res.body.accrual.warnings).toEqual([]);
    expect(res.body.accrual.cohorts[0].projections).toMatchObject({ targets: [], notes: ['The cohort is stopped: nothing left to project.'] });
  });

  it('when a sponsor reads accrual, then the counts are there and no response figure nor patient-level field is anywhere in the JSON', async () => {
    const res = await sponsor.get(`/api/trials/${trial.trialId}/accrual`);
    expect(res.status).toBe(200);
    const keys = keysDeep(res.body);
    expect([...RESPONSE_KEYS, ...PATIENT_LEVEL_KEYS].filter((k) => keys.has(k))).toEqual([]);
    expect(res.body.accrual).toMatchObject({ sitesShown: 'all', totals: { enrolled: 21, evaluable: 20, pendingOutcomes: 7 } });
  });

  it('when a site coordinator reads accrual, then only their own site has a row while the totals cover the trial', async () => {
    const coordinator = await stack.signIn(DEMO.coordinator);
    const accrual = await accrualOf(coordinator);
    expect(accrual.sitesShown).toBe('own');
    expect(accrual.sites.map((s: Site) => s.code)).toEqual(['SA']);
    expect(accrual.warnings.every((w: { siteCode: string }) => w.siteCode === 'SA')).toBe(true);
    expect(accrual.totals.enrolled).toBe(21);
  });

  it('when someone outside the trial asks, then the trial is not found', async () => {
    const outsider = await stack.signIn('nina.newcomer@tessaly.test');
    expect((await outsider.get(`/api/trials/${trial.trialId}/accrual`)).status).toBe(404);
  });
});
