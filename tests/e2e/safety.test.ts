/**
 * The safety journey in the browser, on the demo scenario: TSY-201 monitors toxicity with a
 * continuous boundary and stands one toxicity short of it. The investigator at HCC records a
 * grade 3, probably related event on a patient's page; the boundary is reached, accrual pauses in
 * that write and the statistician and the committee are mailed; the statistician freezes a cut and
 * the committee member sees the safety section in it. Pages pass axe-core, show no raw code and
 * no glyph the shipped Inter lacks, and are saved as screenshots.
 */
import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { addDays, format, parseISO } from 'date-fns';
import { startStack, eventually, type Stack } from '../support/stack.js';
import { DEMO } from '../support/factories.js';
import { freezeCutDirectly } from '../support/data-cut-factories.js';
import { buildClient, launchChromium, readableText, screenshot, seriousAccessibilityProblems, signInThroughPages, textNotDrawnByInter, watchConsole } from '../support/e2e-browser.js';
import { rawCodesIn } from '../support/raw-codes.js';
import { seedDemo } from '../../server/dev/seed/index.js';

let stack: Stack;
let browser: Browser;
let clientDir: string;
let trialId: string;
let cohortId: string;
let patient: { id: string; study_id: string; enrolled_on: string };

beforeAll(async () => {
  [clientDir, browser] = await Promise.all([buildClient(), launchChromium()]);
  stack = await startStack({ SERVE_CLIENT_FROM: clientDir, RATE_LIMIT_PER_MINUTE: '100000' });
  await seedDemo(stack.db);
  ({ id: trialId } = await stack.db('trials').where({ code: 'TSY-201' }).first('id'));
  ({ id: cohortId } = await stack.db('cohorts').where({ trial_id: trialId }).first('id'));
  // A patient at the investigator's site whose 28-day window has closed without any event.
  patient = await stack
    .db('patients as p')
    .join('sites as s', 's.id', 'p.site_id')
    .where({ 'p.cohort_id': cohortId, 's.code': 'HCC' })
    .whereRaw('p.enrolled_on + 28 < current_date')
    .whereNotExists((q) => {
      q.select(1).from('adverse_events as e').whereRaw('e.patient_id = p.id');
    })
    .orderBy('p.enrolment_seq')
    .first('p.id', 'p.study_id', 'p.enrolled_on');
}, 240_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
  if (clientDir) rmSync(clientDir, { recursive: true, force: true });
});

describe('the safety journey in the browser', () => {
  it('when the investigator records a grade 3 related event that reaches the boundary, then accrual pauses and the statistician and the committee are mailed', async () => {
    expect(patient).toBeDefined();
    expect((await stack.db('cohorts').where({ id: cohortId }).first('safety_paused_at')).safety_paused_at).toBeNull();
    const context = await browser.newContext({ locale: 'en-US' });
    const page = await context.newPage();
    const problems = watchConsole(page);
    await signInThroughPages(page, stack.url, DEMO.investigator);
    await page.goto(`${stack.url}/trials/${trialId}/patients/${patient.id}`);
    await page.getByRole('button', { name: 'Record an adverse event' }).click();
    const form = page.getByRole('form', { name: 'Record an adverse event' });
    const onset = format(addDays(parseISO(patient.enrolled_on), 12), 'yyyy-MM-dd');
    const [y, m, d] = onset.split('-');
    await form.getByLabel('Onset date').focus();
    await page.keyboard.type(`${m}${d}${y}`);
    await form.getByLabel('Event as reported (verbatim term)').fill('Hepatotoxicity');
    await form.getByLabel('CTCAE grade').selectOption('3');
    await form.getByLabel('Attribution to the agent').selectOption('probable');
    await form.getByRole('button', { name: 'Record the event' }).click();
    await page.getByText('It crossed the cohort’s safety rule: accrual is now paused for a safety review', { exact: false }).waitFor();
    await screenshot(page, 'investigator-event-reaches-boundary');
    expect(await seriousAccessibilityProblems(page)).toEqual([]);
    expect(rawCodesIn(await readableText(page))).toEqual([]);
    expect(await textNotDrawnByInter(page)).toEqual([]);

    expect((await stack.db('cohorts').where({ id: cohortId }).first('safety_paused_at')).safety_paused_at).not.toBeNull();
    const pauseMail = () => stack.catcher.messages.filter((message) => message.subject.startsWith('TSY-201') && message.subject.endsWith('safety rule crossed — accrual paused'));
    await eventually(() => pauseMail().length >= 2);
    expect(pauseMail().flatMap((message) => message.to).sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
    await page.goto(`${stack.url}/trials/${trialId}`);
    await page.getByText('Accrual paused for a safety review').first().waitFor();
    expect(problems).toEqual([]);
    await context.close();
  }, 120_000);

  it('when the statistician freezes a cut of the paused cohort, then the committee member sees its safety section with the boundary reached', async () => {
    const cut = await freezeCutDirectly(stack.db, { trialId, code: 'TSY-201', cohortIds: [cohortId], siteIds: {} }, { cohortId });
    const context = await browser.newContext({ locale: 'en-US' });
    const page = await context.newPage();
    await signInThroughPages(page, stack.url, DEMO.monitor);
    await page.goto(`${stack.url}/trials/${trialId}/data-cuts/${cut.id}`);
    const section = page.getByRole('region', { name: /Safety — cohort/ });
    await section.getByText('Boundary reached', { exact: false }).waitFor();
    await section.getByText(`Patients counted as toxicities:`, { exact: false }).filter({ hasText: patient.study_id }).waitFor();
    await section.getByRole('table').waitFor();
    await screenshot(page, 'monitor-cut-safety-section');
    expect(await seriousAccessibilityProblems(page)).toEqual([]);
    expect(rawCodesIn(await readableText(page))).toEqual([]);
    expect(await textNotDrawnByInter(page)).toEqual([]);
    await context.close();
  }, 120_000);
});
